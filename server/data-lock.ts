/**
 * One server per data folder: `server.lock` in the folder holds the running server's process id
 * and port. A second server on the same folder stops with a message instead of opening the same
 * database files; a lock left by a process that no longer runs (a crash, SIGKILL) is taken over.
 */
import { linkSync, readFileSync, unlinkSync, writeFileSync } from 'node:fs';
import path from 'node:path';

/** A start-up failure whose message is the whole story (printed without a stack trace). */
export class StartError extends Error {
  override name = 'StartError';
}

export const LOCK_FILE = 'server.lock';

type Owner = { pid: number; port?: number; started_at?: string };

function readOwner(file: string): Owner | null {
  try {
    const o = JSON.parse(readFileSync(file, 'utf8')) as Partial<Owner>;
    return typeof o.pid === 'number' && Number.isInteger(o.pid) && o.pid > 0 ? (o as Owner) : null;
  } catch {
    return null;
  }
}

/** True while a process with this id exists (EPERM: it exists but belongs to someone else). */
export function processAlive(pid: number): boolean {
  try {
    process.kill(pid, 0);
    return true;
  } catch (err) {
    return (err as NodeJS.ErrnoException).code === 'EPERM';
  }
}

/** Throws the StartError `lockDataDir` would, without taking the lock (a check before slow work). */
export function checkDataDirFree(dataDir: string): void {
  const file = path.join(dataDir, LOCK_FILE);
  const held = readOwner(file);
  if (held && held.pid !== process.pid && processAlive(held.pid)) throw inUse(dataDir, file, held);
}

function inUse(dataDir: string, file: string, held: Owner) {
  return new StartError(
    `The data folder ${dataDir} is in use by another Quasilevel server (process ${held.pid}${held.port ? `, port ${held.port}` : ''}). ` +
      `Stop that server first, or set QUASILEVEL_DATA_DIR to another folder. If no such server runs, delete ${file}.`,
  );
}

/**
 * Takes the data folder's lock for this process, or throws StartError naming the server that
 * holds it. The lock file is written whole under another name and then linked into place, so
 * another starting server never reads half a lock. Released by `release()` and at process exit.
 */
export function lockDataDir(dataDir: string, info: { port: number }): { file: string; release: () => void } {
  const file = path.join(dataDir, LOCK_FILE);
  const mine = path.join(dataDir, `${LOCK_FILE}.${process.pid}`);
  const owner: Owner = { pid: process.pid, port: info.port, started_at: new Date().toISOString() };
  writeFileSync(mine, JSON.stringify(owner) + '\n');
  try {
    for (let attempt = 0; attempt < 3; attempt++) {
      try {
        linkSync(mine, file);
        const release = () => {
          try {
            if (readOwner(file)?.pid === process.pid) unlinkSync(file);
          } catch {
            /* already gone */
          }
        };
        process.once('exit', release);
        return { file, release };
      } catch (err) {
        if ((err as NodeJS.ErrnoException).code !== 'EEXIST') throw err;
      }
      const held = readOwner(file);
      // Our own id in an old lock: a container restarted with the same process id.
      if (held && held.pid !== process.pid && processAlive(held.pid)) {
        throw inUse(dataDir, file, held);
      }
      // Stale (its process is gone) or unreadable: take it over, unless it changed meanwhile.
      if (readOwner(file)?.pid === held?.pid) {
        try {
          unlinkSync(file);
        } catch {
          /* another server removed it first */
        }
      }
    }
    throw new StartError(`Another Quasilevel server took the data folder ${dataDir} at the same moment; start only one.`);
  } finally {
    try {
      unlinkSync(mine);
    } catch {
      /* nothing to remove */
    }
  }
}
