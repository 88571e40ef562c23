/**
 * Crash safety (issue 8, item 3): the real server process on a temporary data folder is killed
 * with SIGKILL in the middle of a large multi-file upload, then started again on the same folder.
 * The database must open, every stored curve must be whole (its 200 points, key figures, both fits
 * and the derived columns, all from one transaction) and nothing half-written may be visible.
 * SIGTERM must close PGlite cleanly, which PostgreSQL records in its control file.
 */
import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { eq, sql } from 'drizzle-orm';
import { api, createBatch, signIn, uploadFiles } from '@/bench/api-client';
import { isAlive, signalTree } from '@/bench/process-tree';
import type { Session } from '@/bench/api-client';
import { SYNTHETIC_POINTS, syntheticFiles } from '@/bench/synthetic-files';
import type { SyntheticFile } from '@/bench/synthetic-files';
import { openDatabase } from '@/db/client';
import { curve, fit } from '@/db/schema';
import { isSingleDiodeFit } from '@/lib/iv';
import { startServerProcess } from '@/tests/support/server-process';
import type { ServerProcess } from '@/tests/support/server-process';

// Two server starts (tsx + migrations + demo seed) and a few hundred fits on a shared 2-core machine.
jest.setTimeout(300_000);

const ENGINEER = { email: 'tomas.reyes@kestrel-pv.example', password: 'kestrel-test-demo' }; // sample-data/demo-accounts.json
const UPLOAD_FILES = 400;
/** Kill once the API reports at least this many curves of the upload stored. */
const KILL_AFTER_CURVES = 25;

/**
 * PostgreSQL's cluster state from global/pg_control: the DBState enum at byte 16, after the
 * 8-byte system identifier and two 4-byte version numbers (src/include/catalog/pg_control.h).
 */
const DB_SHUTDOWNED = 1;
const DB_IN_PRODUCTION = 6;
function clusterState(dbDir: string): number {
  return readFileSync(path.join(dbDir, 'global', 'pg_control')).readInt32LE(16);
}

let dataDir: string;
let server: ServerProcess | null = null;
let session: Session;
let batchId: string;
let files: SyntheticFile[];
let storedBeforeKill = 0;
let storedAfterKill: string[] = [];

beforeAll(() => {
  dataDir = mkdtempSync(path.join(os.tmpdir(), 'ql-crash-'));
  files = syntheticFiles(UPLOAD_FILES, { prefix: 'CRASH', seed: 8_003 });
});

const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

/**
 * SIGKILL to the real server: `tsx` runs it in a grandchild process, so the whole tree is signalled
 * (a SIGKILL to the tsx wrapper alone would leave the server running). Returns the ids killed.
 */
async function killServer(s: ServerProcess): Promise<number[]> {
  const pids = s.child.pid ? signalTree(s.child.pid, 'SIGKILL') : [];
  await s.stop({ kill: true, keepData: true });
  // A killed grandchild lingers until init reaps it.
  for (let k = 0; k < 50 && pids.some(isAlive); k++) await sleep(100);
  return pids;
}

afterAll(async () => {
  // Clean up even when a test failed half-way: no server left running, no data folder left behind.
  if (server) await killServer(server).catch(() => undefined);
  server = null;
  rmSync(dataDir, { recursive: true, force: true });
});

/** Opens `<dataDir>/db` in this process (the server must be stopped), runs `fn`, closes it. */
async function withDirectDb<T>(fn: (d: Awaited<ReturnType<typeof openDatabase>>) => Promise<T>): Promise<T> {
  const d = await openDatabase(path.join(dataDir, 'db'));
  try {
    return await fn(d);
  } finally {
    await d.close();
  }
}

describe('crash safety', () => {
  it('a SIGKILL in the middle of a large upload leaves only whole curves', async () => {
    server = await startServerProcess({ dataDir });
    session = await signIn(server.url, ENGINEER.email, ENGINEER.password);
    batchId = await createBatch(session, { name: 'Crash test upload', description: 'killed mid-upload on purpose' });

    // One request with all files; the server stores them one by one (one transaction each).
    const upload = uploadFiles(session, batchId, files).then(
      (r) => ({ ok: true as const, status: r.status }),
      (err: unknown) => ({ ok: false as const, error: String(err) }),
    );
    const deadline = Date.now() + 180_000;
    for (;;) {
      const b = await api<{ curve_count: number }>(session, 'GET', `/api/batches/${batchId}`);
      storedBeforeKill = b.curve_count;
      if (storedBeforeKill >= KILL_AFTER_CURVES) break;
      if (Date.now() > deadline) throw new Error(`only ${storedBeforeKill} curves stored after 180 s`);
      await sleep(50);
    }
    const killed = await killServer(server);
    server = null;
    expect(killed.length).toBeGreaterThanOrEqual(1); // the server process (and anything it started)
    expect(killed.filter(isAlive)).toEqual([]);
    const outcome = await upload;
    // The upload must really have been cut off: the request fails instead of answering 201.
    expect(outcome.ok).toBe(false);
    expect(storedBeforeKill).toBeLessThan(UPLOAD_FILES);

    // PostgreSQL did not get to shut down: the control file still says "in production".
    expect(clusterState(path.join(dataDir, 'db'))).toBe(DB_IN_PRODUCTION);

    const byDevice = new Map(files.map((f) => [f.deviceId, f]));
    await withDirectDb(async ({ db }) => {
      const rows = await db.select().from(curve).where(eq(curve.batchId, batchId));
      // Everything the API reported stored before the kill survived it.
      expect(rows.length).toBeGreaterThanOrEqual(storedBeforeKill);
      expect(rows.length).toBeLessThan(UPLOAD_FILES);
      storedAfterKill = rows.map((r) => r.deviceId);

      const fits = await db.select().from(fit).where(sql`${fit.curveId} in (select id from curve where batch_id = ${batchId})`);
      for (const r of rows) {
        const f = byDevice.get(r.deviceId);
        expect(f).toBeDefined();
        // Points: all 200, equal to the file's (written with 5 decimals, parsed back exactly).
        expect(r.voltage_v).toHaveLength(SYNTHETIC_POINTS);
        expect(r.current_a).toHaveLength(SYNTHETIC_POINTS);
        const plusZero = (xs: number[]) => xs.map((x) => x + 0); // -0 and 0 are the same reading
        expect(plusZero(r.voltage_v)).toEqual(plusZero(f!.voltage_v));
        expect(plusZero(r.current_a)).toEqual(plusZero(f!.current_a));
        expect(r.meta.cells).toBe(f!.cells);
        // Key figures and the derived columns written by the same insert.
        for (const k of ['isc_a', 'voc_v', 'pmp_w', 'ff'] as const) expect(Number.isFinite(r.metrics[k])).toBe(true);
        expect(r.pmp_w).toBe(r.metrics.pmp_w);
        expect(r.n).not.toBeNull();
        expect(r.stc).not.toBeNull();
        // Both fits of the upload, current, each with its residuals for every point.
        const mine = fits.filter((x) => x.curveId === r.id);
        expect(mine.map((x) => x.model).sort()).toEqual(['double-diode', 'single-diode']);
        for (const x of mine) {
          expect(x.current).toBe(true);
          expect(x.result.residuals_a).toHaveLength(SYNTHETIC_POINTS);
        }
        expect(mine.map((x) => x.result).find(isSingleDiodeFit)!.n).toBe(r.n);
      }
      expect(fits).toHaveLength(2 * rows.length);

      // Nothing orphaned anywhere in the database.
      const orphans = await db.execute(sql`select count(*)::int as n from fit f left join curve c on c.id = f.curve_id where c.id is null`);
      expect((orphans.rows[0] as { n: number }).n).toBe(0);
    });
  });

  it('starts again on the same folder: the session, the batch and new uploads work', async () => {
    server = await startServerProcess({ dataDir });
    // The session cookie from before the crash is still valid (sessions and the auth secret live in the data folder).
    session = { ...session, baseUrl: server.url };
    const b = await api<{ curve_count: number; state: string }>(session, 'GET', `/api/batches/${batchId}`);
    expect(b.curve_count).toBe(storedAfterKill.length);
    const page = await api<{ total: number; curves: { id: string; fits: unknown[] }[] }>(session, 'GET', `/api/batches/${batchId}/curves?page_size=500`);
    expect(page.total).toBe(storedAfterKill.length);
    expect(page.curves.every((c) => c.fits.length === 2)).toBe(true);
    const one = await api<{ points: { voltage_v: number[] }; fits: unknown[] }>(session, 'GET', `/api/curves/${page.curves[0].id}`);
    expect(one.points.voltage_v).toHaveLength(SYNTHETIC_POINTS);
    expect(one.fits).toHaveLength(2);

    // Finish part of the interrupted upload: the database takes writes again.
    const stored = new Set(storedAfterKill);
    const rest = files.filter((f) => !stored.has(f.deviceId)).slice(0, 20);
    const res = await uploadFiles(session, batchId, rest);
    expect(res.status).toBe(201);
    expect(res.body).toMatchObject({ accepted: rest.length, rejected: 0 });
    const after = await api<{ curve_count: number }>(session, 'GET', `/api/batches/${batchId}`);
    expect(after.curve_count).toBe(storedAfterKill.length + rest.length);
  });

  it('SIGTERM closes PGlite cleanly and the folder opens again with everything in it', async () => {
    const s = server!;
    const code = await s.stop({ keepData: true });
    server = null;
    expect(code).toBe(0);
    expect(s.log()).toMatch(/SIGTERM: closing the database/);
    // A clean close writes a shutdown checkpoint: the control file says "shut down".
    expect(clusterState(path.join(dataDir, 'db'))).toBe(DB_SHUTDOWNED);
    await withDirectDb(async ({ db }) => {
      const [{ n }] = await db.select({ n: sql<number>`count(*)::int` }).from(curve).where(eq(curve.batchId, batchId));
      expect(n).toBe(storedAfterKill.length + 20);
    });
  });
});
