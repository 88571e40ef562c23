/**
 * The folder watcher (`watch`, cli/commands/watch.ts) against a live server
 * (tests/support/server-process.ts) with a station key made by the demo administrator: files
 * appearing, a file still being written, the server stopped and started again mid-run, the watcher
 * itself restarted, a refused key. The check that matters: the batch holds exactly one curve per
 * valid file, whatever happened on the way. The I-V files are the demo cells of
 * sample-data/batches/kf-c24-cells (unique device ids); the broken file is invented here.
 */
import { spawn } from 'node:child_process';
import type { ChildProcess } from 'node:child_process';
import { copyFileSync, mkdtempSync, readdirSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { ensureCliBuilt, LAUNCHER, REPO, runCli } from '@/tests/cli/built-cli';
import { startServerProcess } from '@/tests/support/server-process';
import type { ServerProcess } from '@/tests/support/server-process';

const CELLS = path.join(REPO, 'sample-data', 'batches', 'kf-c24-cells');
const cellFiles = readdirSync(CELLS).filter((f) => f.endsWith('.csv')).sort();
const ADMIN = { email: 'ada.okafor@kestrel-pv.example', password: 'kestrel-admin-demo' };
const START_MS = 240_000; // a shared machine: migrations, seed and the analysis threads' warm-up

let server: ServerProcess;
let dataDir: string;
let port: number;
let cookie = '';
let key = '';
const dirs: string[] = [];

function tempDir(): string {
  const d = mkdtempSync(path.join(os.tmpdir(), 'ql-watch-'));
  dirs.push(d);
  return d;
}

async function api(method: string, url: string, body?: unknown) {
  const send = () =>
    fetch(`${server.url}${url}`, {
      method,
      headers: { cookie, origin: server.url, ...(body ? { 'content-type': 'application/json' } : {}) },
      body: body ? JSON.stringify(body) : undefined,
    });
  // A kept-alive socket the server closed as idle just as this reading reused it ("other side
  // closed", met on a loaded machine): a GET is asked again once; anything else fails as it came.
  const res = await send().catch((err: unknown) => (method === 'GET' ? send() : Promise.reject(err)));
  return { status: res.status, body: (await res.json()) as Record<string, unknown> };
}

/** The curves stored in the batch of `lot` (read as the administrator). */
async function curvesOfLot(lot: string): Promise<{ id: string; total: number; devices: string[] }> {
  const list = (await api('GET', '/api/batches')).body.batches as { id: string; lot: string | null }[];
  const b = list.find((x) => x.lot === lot);
  if (!b) return { id: '', total: 0, devices: [] };
  const page = (await api('GET', `/api/batches/${b.id}/curves?page_size=500`)).body as { total: number; curves: { device_id: string }[] };
  return { id: b.id, total: page.total, devices: page.curves.map((c) => c.device_id).sort() };
}

const copyCell = (dir: string, k: number) => copyFileSync(path.join(CELLS, cellFiles[k]), path.join(dir, cellFiles[k]));
const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

/** A running watcher with its output so far. */
function startWatcher(args: string[]): { child: ChildProcess; out: () => string; exited: Promise<number | null> } {
  ensureCliBuilt();
  let out = '';
  const child = spawn(process.execPath, [LAUNCHER, 'watch', ...args], { cwd: REPO, stdio: ['ignore', 'pipe', 'pipe'] });
  child.stdout!.on('data', (d) => (out += d));
  child.stderr!.on('data', (d) => (out += d));
  const exited = new Promise<number | null>((r) => child.on('exit', (code) => r(code)));
  return { child, out: () => out, exited };
}

async function until(what: string, check: () => boolean | Promise<boolean>, ms = 60_000, log = () => ''): Promise<void> {
  const end = Date.now() + ms;
  while (!(await check())) {
    if (Date.now() > end) throw new Error(`timed out waiting for ${what}\n${log()}`);
    await sleep(200);
  }
}

const count = (text: string, word: string) => text.split('\n').filter((l) => l.startsWith(word)).length;

beforeAll(async () => {
  server = await startServerProcess({ timeoutMs: START_MS });
  dataDir = server.dataDir;
  port = server.port;
  const signIn = await fetch(`${server.url}/api/auth/sign-in/email`, { method: 'POST', headers: { 'content-type': 'application/json', origin: server.url }, body: JSON.stringify(ADMIN) });
  expect(signIn.status).toBe(200);
  cookie = (signIn.headers.getSetCookie?.() ?? []).map((c) => c.split(';')[0]).join('; ');
  const made = await api('POST', '/api/stations', { name: 'Line 1 flasher' });
  expect(made.status).toBe(201);
  key = String(made.body.key);
}, START_MS + 30_000);

afterAll(async () => {
  await server?.stop({ keepData: true });
  rmSync(dataDir, { recursive: true, force: true });
  for (const d of dirs) rmSync(d, { recursive: true, force: true });
});

describe('watch --once', () => {
  it('sends every file once, records the server’s rejection, and sends nothing again on a second run', async () => {
    const dir = tempDir();
    for (let k = 0; k < 6; k++) copyCell(dir, k);
    // Invented: a file that is not an I-V table; the server rejects it with a reason.
    writeFileSync(path.join(dir, 'notes.txt'), 'operator: shift B\nnothing to measure here\n');
    const args = [dir, '--server', server.url, '--key', key, '--lot', 'ONCE-1', '--once', '--settle-ms', '100'];
    const first = runCli(['watch', ...args]);
    expect(first.stderr).toBe('');
    expect(first.status).toBe(0);
    expect(count(first.stdout, 'accepted')).toBe(6);
    expect(count(first.stdout, 'rejected')).toBe(1);
    expect(first.stdout).toMatch(/watch: 7 files: 6 accepted, 1 rejected by the server, 0 answered before, 0 not sent/);
    const second = runCli(['watch', ...args]);
    expect(second.status).toBe(0);
    expect(second.stdout).toMatch(/watch: 7 files: 0 accepted, 0 rejected by the server, 7 answered before, 0 not sent/);
    const lot = await curvesOfLot('ONCE-1');
    expect(lot.total).toBe(6);
    // The journal names each content's answer; the rejection keeps its reason.
    const journal = readFileSync(path.join(dir, '.quasilevel-watch.jsonl'), 'utf8').trim().split('\n').map((l) => JSON.parse(l));
    expect(journal.filter((e) => e.kind === 'rejected')).toEqual([expect.objectContaining({ file: 'notes.txt', reason: expect.any(String) })]);
    // A changed file is a new content: sent again, and it replaces its device's curve (still one per file).
    writeFileSync(path.join(dir, cellFiles[0]), readFileSync(path.join(dir, cellFiles[0]), 'utf8').replace('# cell temperature: 25.3', '# cell temperature: 26.0'));
    const third = runCli(['watch', ...args]);
    expect(third.status).toBe(0);
    expect(count(third.stdout, 'accepted')).toBe(1);
    expect((await curvesOfLot('ONCE-1')).total).toBe(6);
  }, 120_000);

  it('a wrong key: says the server refused it and stops (exit 1)', () => {
    const dir = tempDir();
    copyCell(dir, 0);
    const r = runCli(['watch', dir, '--server', server.url, '--key', 'qls_' + 'w'.repeat(64), '--lot', 'NOPE', '--once', '--settle-ms', '100']);
    expect(r.status).toBe(1);
    expect(r.stdout).toMatch(/stopped\s+the server refused the station key \(401\): This station key is not valid/);
  }, 60_000);
});

describe('watching a folder while the line runs', () => {
  it('files appearing, one still being written, the server down and back, the watcher restarted: one curve per file', async () => {
    const dir = tempDir();
    const args = [dir, '--server', server.url, '--key', key, '--lot', 'LIVE-1', '--settle-ms', '700'];
    let w = startWatcher(args);
    await until('the watcher to start', () => w.out().includes('watching'), 30_000, w.out);
    // Files appearing one by one.
    for (let k = 10; k < 13; k++) {
      copyCell(dir, k);
      await sleep(150);
    }
    await until('three files accepted', () => count(w.out(), 'accepted') === 3, 60_000, w.out);
    // A file still being written: half now, the rest after a pause shorter than the settle time.
    const text = readFileSync(path.join(CELLS, cellFiles[13]), 'utf8');
    const half = text.indexOf('\n', Math.floor(text.length / 2)) + 1;
    writeFileSync(path.join(dir, cellFiles[13]), text.slice(0, half));
    await sleep(300);
    writeFileSync(path.join(dir, cellFiles[13]), text);
    await until('the written file accepted', () => count(w.out(), 'accepted') === 4, 60_000, w.out);
    expect(w.out()).not.toMatch(/rejected/);

    // The server stops; files keep arriving and wait.
    await server.stop({ keepData: true });
    copyCell(dir, 14);
    copyCell(dir, 15);
    await until('the watcher to notice the outage', () => w.out().includes('waiting'), 30_000, w.out);
    // Meanwhile a --once run over another folder cannot send anything: it says so and exits 2.
    const offline = tempDir();
    copyCell(offline, 20);
    copyCell(offline, 21);
    const onceArgs = [offline, '--server', server.url, '--key', key, '--lot', 'ONCE-DOWN', '--once', '--settle-ms', '100', '--retries', '2'];
    const down = runCli(['watch', ...onceArgs]);
    expect(down.status).toBe(2);
    expect(down.stdout).toMatch(/watch: 2 files: 0 accepted, 0 rejected by the server, 0 answered before, 2 not sent/);
    // The watcher is restarted meanwhile too (nothing answered yet for the waiting files).
    w.child.kill('SIGTERM');
    expect(await w.exited).toBe(2);
    expect(w.out()).toMatch(/not sent/);
    w = startWatcher(args);
    await until('the new watcher to wait', () => w.out().includes('waiting'), 30_000, w.out);
    server = await startServerProcess({ dataDir, port, timeoutMs: START_MS });
    await until('the waiting files accepted', () => count(w.out(), 'accepted') === 2, 90_000, w.out);
    // The earlier files were answered before the restart: not sent again.
    expect(count(w.out(), 'known')).toBe(4);
    copyCell(dir, 16);
    await until('a file after the outage accepted', () => count(w.out(), 'accepted') === 3, 60_000, w.out);
    w.child.kill('SIGTERM');
    expect(await w.exited).toBe(0);

    // The --once run again, the server back: everything sent, exit 0.
    const up = runCli(['watch', ...onceArgs]);
    expect(up.status).toBe(0);
    expect((await curvesOfLot('ONCE-DOWN')).total).toBe(2);

    const lot = await curvesOfLot('LIVE-1');
    expect(lot.total).toBe(7);
    expect(lot.devices).toEqual(cellFiles.slice(10, 17).map((f) => f.replace('.csv', '')));
  }, 600_000);
});
