/**
 * The analysis threads yield to the HTTP thread: piscina's niceIncrement lowers each worker
 * thread's priority (Linux nice is per thread), and the calling thread keeps its own. In a file of
 * its own, so no other pool's threads are counted.
 */
import { existsSync, readdirSync, readFileSync } from 'node:fs';
import path from 'node:path';
import { REFERENCE_DATA_DIR } from '@/tests/support/reference-data';
import { workerAnalyser } from '@/server/services/analysis-pool';
import { demoCurveFiles } from '@/server/services/seed';

const REF = REFERENCE_DATA_DIR;
const cell = { bytes: new Uint8Array(readFileSync(path.join(REF, 'cell-57mm-33C.csv'))), fileName: 'cell.csv', overrides: { temp_c: 33, cells: 1 } };

/** The nice value of a thread of this process (Linux: /proc/self/task/<tid>/stat, field 19), null once it has ended. */
function niceOf(tid: string): number | null {
  try {
    const stat = readFileSync(`/proc/self/task/${tid}/stat`, 'utf8');
    return Number(stat.slice(stat.lastIndexOf(')') + 2).split(' ')[16]);
  } catch {
    return null;
  }
}

(existsSync('/proc/self/task') ? describe : describe.skip)('thread priority (Linux)', () => {
  it('runs the analysis threads at nice 10 and leaves the threads that were there as they were', async () => {
    const before = new Map(readdirSync('/proc/self/task').map((tid) => [tid, niceOf(tid)]));
    const pool = workerAnalyser(2, { nice: 10, warmFiles: demoCurveFiles().slice(0, 1) });
    try {
      await Promise.all([pool.analyse(cell), pool.analyse(cell)]);
      const started = readdirSync('/proc/self/task').filter((tid) => !before.has(tid));
      // Each worker thread, and any helper thread it starts afterwards (which inherits its nice value).
      expect(started.map(niceOf).filter((n) => n === 10).length).toBeGreaterThanOrEqual(2);
      for (const [tid, nice] of before) if (niceOf(tid) !== null) expect([tid, niceOf(tid)]).toEqual([tid, nice]);
      expect(before.get(String(process.pid))).not.toBe(10);
    } finally {
      await pool.close();
    }
  });
});
