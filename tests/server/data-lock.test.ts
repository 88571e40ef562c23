/**
 * The data folder's lock (server/data-lock.ts) in this process: taken and released, refused while
 * a live process holds it, taken over from a process that has ended or from an unreadable file.
 * The real two-server case runs in tests/robustness/one-server.test.ts.
 */
import { spawnSync } from 'node:child_process';
import { existsSync, mkdtempSync, readFileSync, readdirSync, rmSync, writeFileSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { checkDataDirFree, LOCK_FILE, lockDataDir, StartError } from '@/server/data-lock';

let dir: string;
beforeEach(() => {
  dir = mkdtempSync(path.join(os.tmpdir(), 'ql-lock-'));
});
afterEach(() => {
  rmSync(dir, { recursive: true, force: true });
});

/** The id of a process that has ended: a child that exited at once. */
function deadPid(): number {
  const r = spawnSync(process.execPath, ['-e', 'process.stdout.write(String(process.pid))']);
  return Number(r.stdout.toString());
}

const lockFile = () => path.join(dir, LOCK_FILE);

it('writes this process’s id and port, leaves no other file, and release removes it', () => {
  const lock = lockDataDir(dir, { port: 8123 });
  expect(JSON.parse(readFileSync(lockFile(), 'utf8'))).toEqual(expect.objectContaining({ pid: process.pid, port: 8123 }));
  expect(readdirSync(dir)).toEqual([LOCK_FILE]);
  lock.release();
  expect(existsSync(lockFile())).toBe(false);
});

it('a lock held by a live process (the test runner’s parent) is refused with its id and port', () => {
  writeFileSync(lockFile(), JSON.stringify({ pid: process.ppid, port: 9001 }));
  expect(() => lockDataDir(dir, { port: 8123 })).toThrow(StartError);
  expect(() => lockDataDir(dir, { port: 8123 })).toThrow(`is in use by another Quasilevel server (process ${process.ppid}, port 9001)`);
  expect(() => checkDataDirFree(dir)).toThrow(StartError);
  // The holder's lock is left as it was.
  expect(JSON.parse(readFileSync(lockFile(), 'utf8')).pid).toBe(process.ppid);
});

it.each([
  ['a process that has ended', () => JSON.stringify({ pid: deadPid(), port: 9002 })],
  ['an unreadable file', () => 'not json'],
  ['this very process id (a restarted container)', () => JSON.stringify({ pid: process.pid })],
])('a stale lock from %s is taken over', (_what, content) => {
  writeFileSync(lockFile(), content());
  expect(() => checkDataDirFree(dir)).not.toThrow();
  const lock = lockDataDir(dir, { port: 8124 });
  expect(JSON.parse(readFileSync(lockFile(), 'utf8'))).toEqual(expect.objectContaining({ pid: process.pid, port: 8124 }));
  lock.release();
});
