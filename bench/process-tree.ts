/**
 * The processes under a child process (Linux /proc). `tsx server/index.ts` runs the server in a
 * grandchild node process: a SIGKILL to the tsx wrapper alone leaves the real server running as an
 * orphan, so the crash test and the harnesses signal the whole tree.
 */
import { readdirSync, readFileSync } from 'node:fs';

/** Every descendant of `pid`, children before grandchildren; empty where /proc is not available. */
export function descendantPids(pid: number): number[] {
  const out: number[] = [];
  const queue = [pid];
  while (queue.length) {
    const p = queue.shift()!;
    let tasks: string[] = [];
    try {
      tasks = readdirSync(`/proc/${p}/task`);
    } catch {
      continue;
    }
    for (const t of tasks) {
      let children = '';
      try {
        children = readFileSync(`/proc/${p}/task/${t}/children`, 'utf8');
      } catch {
        continue;
      }
      for (const c of children.split(/\s+/).filter(Boolean).map(Number)) {
        out.push(c);
        queue.push(c);
      }
    }
  }
  return out;
}

/** True while a process with this id exists. */
export function isAlive(pid: number): boolean {
  try {
    process.kill(pid, 0);
    return true;
  } catch {
    return false;
  }
}

/** Sends `signal` to the deepest processes first, then up to `pid`; returns the ids signalled. */
export function signalTree(pid: number, signal: NodeJS.Signals): number[] {
  const all = [pid, ...descendantPids(pid)].reverse();
  for (const p of all) {
    try {
      process.kill(p, signal);
    } catch {
      /* already gone */
    }
  }
  return all;
}
