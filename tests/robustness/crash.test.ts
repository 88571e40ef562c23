/**
 * Crash safety (issue 8, item 3): the real server process on a temporary data folder is killed
 * with SIGKILL in the middle of a large multi-file upload, then started again on that folder (each
 * test on its own copy of it, so each can run alone). The database must open, every stored curve must be whole (its 200 points, key figures, both fits
 * and the derived columns, all from one transaction) and nothing half-written may be visible.
 * SIGTERM must close PGlite cleanly, which PostgreSQL records in its control file.
 */
import { cpSync, mkdtempSync, readFileSync, rmSync } from 'node:fs';
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
import { seededDataDir, startServerProcess } from '@/tests/support/server-process';
import type { ServerProcess } from '@/tests/support/server-process';

/**
 * Readiness deadline of each server start in this file: 4 minutes. A start loads the server
 * bundle, opens (or recovers) PGlite, seeds the demo data with its fits and warms the
 * analysis threads; with other suites using both cores it has taken over a minute, and a start
 * that misses its deadline says nothing about crash safety. 4 minutes is generous on purpose.
 */
const START_BUDGET_MS = 240_000;
/** How long the upload may take to store its first KILL_AFTER_CURVES curves. */
const UPLOAD_BUDGET_MS = 180_000;
// Worst case of one test: the crash (a start, the upload, the kill, a look at the folder) and a
// second start with a short upload; about a minute and a half when the machine is quiet.
jest.setTimeout(2 * START_BUDGET_MS + UPLOAD_BUDGET_MS + 180_000);

const ENGINEER = { email: 'tomas.reyes@kestrel-pv.example', password: 'kestrel-test-demo' }; // sample-data/demo-accounts.json
const UPLOAD_FILES = 400;
/** Kill once the API reports at least this many curves of the upload stored. */
const KILL_AFTER_CURVES = 25;
const files: SyntheticFile[] = syntheticFiles(UPLOAD_FILES, { prefix: 'CRASH', seed: 8_003 });

/**
 * PostgreSQL's cluster state from global/pg_control: the DBState enum at byte 16, after the
 * 8-byte system identifier and two 4-byte version numbers (src/include/catalog/pg_control.h).
 */
const DB_SHUTDOWNED = 1;
const DB_IN_PRODUCTION = 6;
function clusterState(dbDir: string): number {
  return readFileSync(path.join(dbDir, 'global', 'pg_control')).readInt32LE(16);
}

const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

/** Everything made by this file, removed in afterAll even when a test failed half-way. */
const folders: string[] = [];
const servers = new Set<ServerProcess>();

function newFolder(tag: string): string {
  const dir = mkdtempSync(path.join(os.tmpdir(), `ql-crash-${tag}-`));
  folders.push(dir);
  return dir;
}

async function start(dataDir: string): Promise<ServerProcess> {
  const s = await startServerProcess({ dataDir, timeoutMs: START_BUDGET_MS });
  servers.add(s);
  return s;
}

/**
 * SIGKILL to the real server and anything it started (its analysis threads live in the same
 * process, but a tree kill also covers a runner that forks). Returns the ids killed.
 */
async function killServer(s: ServerProcess): Promise<number[]> {
  const pids = s.child.pid ? signalTree(s.child.pid, 'SIGKILL') : [];
  await s.stop({ kill: true, keepData: true });
  servers.delete(s);
  // A killed grandchild lingers until init reaps it.
  for (let k = 0; k < 50 && pids.some(isAlive); k++) await sleep(100);
  return pids;
}

afterAll(async () => {
  for (const s of [...servers]) await killServer(s).catch(() => undefined);
  for (const dir of folders) rmSync(dir, { recursive: true, force: true });
});

/** Opens `<dataDir>/db` in this process (no server may be running on it), runs `fn`, closes it. */
async function withDirectDb<T>(dataDir: string, fn: (d: Awaited<ReturnType<typeof openDatabase>>) => Promise<T>): Promise<T> {
  const d = await openDatabase(path.join(dataDir, 'db'));
  try {
    return await fn(d);
  } finally {
    await d.close();
  }
}

type Crash = {
  /** The data folder as the SIGKILL left it. Never opened again: tests work on copies of it. */
  dataDir: string;
  session: Session;
  batchId: string;
  storedBeforeKill: number;
  killed: number[];
  upload: { ok: true; status: number } | { ok: false; error: string };
  /** Device ids of the curves in the folder after the kill (read from a copy). */
  storedAfterKill: string[];
};

let crash: Promise<Crash> | null = null;

/**
 * The server on a new folder, a large upload, and a SIGKILL once KILL_AFTER_CURVES curves are
 * stored. Made once for the file by whichever test asks first, so any test can run alone (`-t`).
 */
function crashed(): Promise<Crash> {
  crash ??= (async () => {
    // The demo data as `npm test` seeded it (a copy), or an empty folder that this start seeds.
    const dataDir = await seededDataDir('ql-crash-killed-');
    folders.push(dataDir);
    const server = await start(dataDir);
    const session = await signIn(server.url, ENGINEER.email, ENGINEER.password);
    const batchId = await createBatch(session, { name: 'Crash test upload', description: 'killed mid-upload on purpose' });
    // One request with all files; the server stores them in groups, one transaction each.
    const upload = uploadFiles(session, batchId, files).then(
      (r) => ({ ok: true as const, status: r.status }),
      (err: unknown) => ({ ok: false as const, error: String(err) }),
    );
    const deadline = Date.now() + UPLOAD_BUDGET_MS;
    let storedBeforeKill = 0;
    for (;;) {
      const b = await api<{ curve_count: number }>(session, 'GET', `/api/batches/${batchId}`);
      storedBeforeKill = b.curve_count;
      if (storedBeforeKill >= KILL_AFTER_CURVES) break;
      if (Date.now() > deadline) throw new Error(`only ${storedBeforeKill} curves stored after ${UPLOAD_BUDGET_MS / 1000} s`);
      await sleep(50);
    }
    const killed = await killServer(server);
    const outcome = await upload;
    const look = copyOfCrash(dataDir, 'look');
    const storedAfterKill = await withDirectDb(look, async ({ db }) =>
      (await db.select({ deviceId: curve.deviceId }).from(curve).where(eq(curve.batchId, batchId))).map((r) => r.deviceId),
    );
    return { dataDir, session, batchId, storedBeforeKill, killed, upload: outcome, storedAfterKill };
  })();
  return crash;
}

/** A private copy of the killed folder, so no test sees what another did to it. */
function copyOfCrash(killedDir: string, tag: string): string {
  const dir = newFolder(tag);
  cpSync(killedDir, dir, { recursive: true });
  return dir;
}

describe('crash safety', () => {
  it('a SIGKILL in the middle of a large upload leaves only whole curves', async () => {
    const c = await crashed();
    expect(c.killed.length).toBeGreaterThanOrEqual(1); // the server process (and anything it started)
    expect(c.killed.filter(isAlive)).toEqual([]);
    // The upload must really have been cut off: the request fails instead of answering 201.
    expect(c.upload.ok).toBe(false);
    expect(c.storedBeforeKill).toBeLessThan(UPLOAD_FILES);

    const dataDir = copyOfCrash(c.dataDir, 'whole');
    // PostgreSQL did not get to shut down: the control file still says "in production".
    expect(clusterState(path.join(dataDir, 'db'))).toBe(DB_IN_PRODUCTION);

    const byDevice = new Map(files.map((f) => [f.deviceId, f]));
    await withDirectDb(dataDir, async ({ db }) => {
      const rows = await db.select().from(curve).where(eq(curve.batchId, c.batchId));
      // Everything the API reported stored before the kill survived it.
      expect(rows.length).toBeGreaterThanOrEqual(c.storedBeforeKill);
      expect(rows.length).toBeLessThan(UPLOAD_FILES);

      const fits = await db.select().from(fit).where(sql`${fit.curveId} in (select id from curve where batch_id = ${c.batchId})`);
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

  it('starts again on the killed folder: the session, the batch and new uploads work', async () => {
    const c = await crashed();
    const dataDir = copyOfCrash(c.dataDir, 'restart');
    expect(clusterState(path.join(dataDir, 'db'))).toBe(DB_IN_PRODUCTION); // the server does the recovery
    const server = await start(dataDir);
    try {
      // The session cookie from before the crash is still valid (sessions and the auth secret live in the data folder).
      const session = { ...c.session, baseUrl: server.url };
      const b = await api<{ curve_count: number; state: string }>(session, 'GET', `/api/batches/${c.batchId}`);
      expect(b.curve_count).toBe(c.storedAfterKill.length);
      const page = await api<{ total: number; curves: { id: string; fits: unknown[] }[] }>(session, 'GET', `/api/batches/${c.batchId}/curves?page_size=500`);
      expect(page.total).toBe(c.storedAfterKill.length);
      expect(page.curves.every((x) => x.fits.length === 2)).toBe(true);
      const one = await api<{ points: { voltage_v: number[] }; fits: unknown[] }>(session, 'GET', `/api/curves/${page.curves[0].id}`);
      expect(one.points.voltage_v).toHaveLength(SYNTHETIC_POINTS);
      expect(one.fits).toHaveLength(2);

      // Issue 20: each surviving curve's original was stored before the curve, so it comes back byte
      // for byte; the start-up cleanup ran over the archive and logged its count.
      expect(server.log()).toMatch(/original files: \d+ object\(s\) in http:\/\/127\.0\.0\.1:\d+\/[^,]+, \d+ orphan\(s\) no row points to removed/);
      const text = new Map(files.map((f) => [f.deviceId, f.text]));
      for (const x of page.curves.slice(0, 5)) {
        const detail = await api<{ device_id: string }>(session, 'GET', `/api/curves/${x.id}`);
        const res = await fetch(`${server.url}/api/curves/${x.id}/original`, { headers: { cookie: session.cookie } });
        expect(res.status).toBe(200);
        expect(Buffer.compare(Buffer.from(await res.arrayBuffer()), Buffer.from(text.get(detail.device_id)!))).toBe(0);
      }

      // Finish part of the interrupted upload: the database takes writes again.
      const stored = new Set(c.storedAfterKill);
      const rest = files.filter((f) => !stored.has(f.deviceId)).slice(0, 20);
      const res = await uploadFiles(session, c.batchId, rest);
      expect(res.status).toBe(201);
      expect(res.body).toMatchObject({ accepted: rest.length, rejected: 0 });
      const after = await api<{ curve_count: number }>(session, 'GET', `/api/batches/${c.batchId}`);
      expect(after.curve_count).toBe(c.storedAfterKill.length + rest.length);
    } finally {
      await killServer(server);
    }
  });

  it('SIGTERM closes PGlite cleanly and the folder opens again with everything in it', async () => {
    const c = await crashed();
    const dataDir = copyOfCrash(c.dataDir, 'sigterm');
    const server = await start(dataDir);
    // Writes made after the recovery, so the clean close has something of its own to keep.
    const session = { ...c.session, baseUrl: server.url };
    const stored = new Set(c.storedAfterKill);
    const rest = files.filter((f) => !stored.has(f.deviceId)).slice(0, 10);
    expect((await uploadFiles(session, c.batchId, rest)).status).toBe(201);
    const { curve_count } = await api<{ curve_count: number }>(session, 'GET', `/api/batches/${c.batchId}`);
    expect(curve_count).toBe(c.storedAfterKill.length + rest.length);

    const code = await server.stop({ keepData: true });
    servers.delete(server);
    expect(code).toBe(0);
    expect(server.log()).toMatch(/SIGTERM: closing the database/);
    // A clean close writes a shutdown checkpoint: the control file says "shut down".
    expect(clusterState(path.join(dataDir, 'db'))).toBe(DB_SHUTDOWNED);
    await withDirectDb(dataDir, async ({ db }) => {
      const [{ n }] = await db.select({ n: sql<number>`count(*)::int` }).from(curve).where(eq(curve.batchId, c.batchId));
      expect(n).toBe(curve_count);
    });
  });
});
