/**
 * The upload analysers: the worker-thread pool the server uses gives exactly the inline results
 * (same engine, structured-cloned), reports unreadable files as outcomes, shares one queue, and
 * an upload through the app on the pool stores every curve whole, in file order.
 * Reference curves: tests/fixtures/reference-data (Easwarakhanthan et al. 1986, see its README).
 */
import { readFileSync } from 'node:fs';
import path from 'node:path';
import { asc, eq } from 'drizzle-orm';
import { curve, fit } from '@/db/schema';
import { SAMPLE_DIR, demoCurveFiles } from '@/server/services/seed';
import { ANALYSIS_BACKLOG, analyseToOutcome, analysisThreads, analysisWarmUp, inlineAnalyser, workerAnalyser } from '@/server/services/analysis-pool';
import type { AnalysisRequest } from '@/server/services/analysis-pool';
import { signUp, startHarness } from '@/tests/server/harness';
import { REFERENCE_DATA_DIR } from '@/tests/support/reference-data';

// A thread of the pool here loads the engine's TypeScript through tsx on its first file (the
// server bundle's threads load build/analysis-worker.cjs instead): beside the browser lane on a
// loaded 2-core machine, a fresh clone's first such test took 41 s and the upload test below
// went past 60 s (CI, 3 December 2026). The tests check what the pool does, not how fast.
jest.setTimeout(240_000);

const REF = REFERENCE_DATA_DIR;
const bytes = (p: string) => new Uint8Array(readFileSync(p));
const cell: AnalysisRequest = { bytes: bytes(path.join(REF, 'cell-57mm-33C.csv')), fileName: 'cell.csv', overrides: { temp_c: 33, cells: 1 } };
const moduleReq: AnalysisRequest = { bytes: bytes(path.join(REF, 'module-36cell-45C.csv')), fileName: 'module.csv', overrides: { temp_c: 45, cells: 36 } };
const garbage: AnalysisRequest = { bytes: new TextEncoder().encode('V,I\nabc,def\n'), fileName: 'garbage.csv' };

describe('workerAnalyser()', () => {
  const pool = workerAnalyser(2, { warmFiles: demoCurveFiles().slice(0, 2) });
  afterAll(() => pool.close());

  it('gives the same analysis as the calling thread, field for field', async () => {
    for (const req of [cell, moduleReq]) {
      const inThread = analyseToOutcome(req);
      const inWorker = await pool.analyse(req);
      expect(inWorker.ok).toBe(true);
      if (!inWorker.ok || !inThread.ok) return;
      // elapsed_ms differs run to run; everything else is the same deterministic computation.
      const strip = (a: typeof inThread.analysis) => ({ ...a, fits: a.fits.map(({ elapsed_ms: _e, ...f }) => f) });
      expect(strip(inWorker.analysis)).toEqual(strip(inThread.analysis));
    }
  });

  it('refits a stored curve (free idealities) as the calling thread would', async () => {
    const first = analyseToOutcome(moduleReq);
    if (!first.ok) throw new Error('the reference module must read');
    const req = { curve: first.analysis.curve, idealities: 'free' as const, models: ['double' as const] };
    const inThread = analyseToOutcome(req);
    const inWorker = await pool.analyse(req);
    if (!inWorker.ok || !inThread.ok) throw new Error('the refit must succeed');
    expect(inWorker.analysis.fits.map(({ elapsed_ms: _e, ...f }) => f)).toEqual(inThread.analysis.fits.map(({ elapsed_ms: _e, ...f }) => f));
    expect(inWorker.analysis.fits[0].model).toBe('double-diode');
  });

  it('returns the reader’s objection for an unusable file instead of throwing', async () => {
    const out = await pool.analyse(garbage);
    const inline = analyseToOutcome(garbage);
    expect(out).toEqual(inline);
    expect(out.ok).toBe(false);
    if (!out.ok && out.kind === 'input') expect(out.message.length).toBeGreaterThan(10);
  });

  it('answers every one of many queued files, in any order of completion', async () => {
    const reqs = Array.from({ length: 24 }, (_, k) => (k % 3 === 2 ? garbage : k % 2 ? moduleReq : cell));
    const outs = await Promise.all(reqs.map((r) => pool.analyse(r)));
    outs.forEach((o, k) => expect(o.ok).toBe(reqs[k] !== garbage));
  });
});

describe('a thread that dies', () => {
  it('fails only the file it was on; the files queued behind it on that thread are analysed', async () => {
    // One thread, so every file is in its backlog when the fourth one ends it.
    const pool = workerAnalyser(1, { filename: path.join(__dirname, '..', 'support', 'dying-analysis-worker.cjs') });
    try {
      const names = Array.from({ length: 10 }, (_, k) => (k === 3 ? 'die.csv' : `f${k}.csv`));
      expect(names.length).toBeLessThanOrEqual(ANALYSIS_BACKLOG);
      const outs = await Promise.all(names.map((fileName) => pool.analyse({ bytes: new Uint8Array(1), fileName })));
      expect(outs[3]).toMatchObject({ ok: false, kind: 'failure', message: expect.stringMatching(/^the analysis thread stopped/) });
      expect(outs.filter((_, k) => k !== 3)).toEqual(names.filter((_, k) => k !== 3).map((file) => ({ ok: true, analysis: { file } })));
    } finally {
      await pool.close();
    }
  });
});

describe('closing a pool', () => {
  it('settles queued work as failures and refuses new work, without rejecting', async () => {
    const pool = workerAnalyser(1);
    const pending = Array.from({ length: 10 }, () => pool.analyse(moduleReq));
    await pool.close();
    const outs = await Promise.all(pending);
    expect(outs.filter((o) => !o.ok && o.kind === 'failure').length).toBeGreaterThanOrEqual(9);
    const after = await pool.analyse(cell);
    expect(after).toEqual({ ok: false, kind: 'failure', message: 'the server is shutting down' });
  });
});

/** Puts the variable back as it was before the describe block after each of its tests. */
function restoreEnvAfterEach(name: string): void {
  const saved = process.env[name];
  afterEach(() => {
    if (saved === undefined) delete process.env[name];
    else process.env[name] = saved;
  });
}

describe('analysisThreads()', () => {
  restoreEnvAfterEach('QUASILEVEL_ANALYSIS_THREADS');
  it('reads QUASILEVEL_ANALYSIS_THREADS and refuses nonsense', () => {
    process.env.QUASILEVEL_ANALYSIS_THREADS = '0';
    expect(analysisThreads()).toBe(0);
    process.env.QUASILEVEL_ANALYSIS_THREADS = 'lots';
    expect(() => analysisThreads()).toThrow(/whole number/);
    delete process.env.QUASILEVEL_ANALYSIS_THREADS;
    expect(analysisThreads()).toBeGreaterThanOrEqual(1);
  });
});

describe('analysisWarmUp()', () => {
  restoreEnvAfterEach('QUASILEVEL_ANALYSIS_WARMUP');
  it('warms up unless QUASILEVEL_ANALYSIS_WARMUP is 0, and refuses other values', () => {
    delete process.env.QUASILEVEL_ANALYSIS_WARMUP;
    expect(analysisWarmUp()).toBe(true);
    process.env.QUASILEVEL_ANALYSIS_WARMUP = '0';
    expect(analysisWarmUp()).toBe(false);
    process.env.QUASILEVEL_ANALYSIS_WARMUP = '1';
    expect(analysisWarmUp()).toBe(true);
    process.env.QUASILEVEL_ANALYSIS_WARMUP = 'no';
    expect(() => analysisWarmUp()).toThrow(/must be 0 or 1/);
  });
});

describe('an upload through the app on the worker pool', () => {
  it('stores every readable file whole (curve + 2 fits), in file order, and rejects the rest', async () => {
    const h = await startHarness({ analyser: workerAnalyser(2) });
    try {
      await signUp(h.app, { email: 'admin@lambda-pv.example' }); // the first of a domain administers it
      const tester = await signUp(h.app, { email: 'tester@lambda-pv.example' });
      const b = await tester.post('/api/batches').send({ name: 'Pool upload' });
      expect(b.status).toBe(201);
      // 60 files (more than two store groups), every fifth unreadable.
      const demo = demoCurveFiles();
      expect(demo.length).toBeGreaterThan(10);
      let req = tester.post(`/api/batches/${b.body.id}/curves`);
      const names: string[] = [];
      for (let k = 0; k < 60; k++) {
        const name = `P${String(k).padStart(2, '0')}.csv`;
        names.push(name);
        const text = k % 5 === 4 ? 'Voltage (V),Current (A)\n1,2\n' : readFileSync(demo[k % demo.length], 'utf8').replace(/^# device:.*$/m, `# device: P${k}`);
        req = req.attach('files', Buffer.from(text), name);
      }
      const res = await req;
      expect(res.status).toBe(201);
      expect(res.body.accepted).toBe(48);
      expect(res.body.results.map((r: { file: string }) => r.file)).toEqual(names);
      const rows = await h.database.db.select({ id: curve.id, file: curve.fileName }).from(curve).where(eq(curve.batchId, b.body.id)).orderBy(asc(curve.createdAt));
      expect(rows.map((r) => r.file)).toEqual(names.filter((_, k) => k % 5 !== 4));
      for (const r of rows) expect((await h.database.db.select().from(fit).where(eq(fit.curveId, r.id))).length).toBe(2);
    } finally {
      await h.close();
    }
  });
});

it('the demo files the threads warm up on exist', () => {
  expect(demoCurveFiles().every((f) => f.startsWith(SAMPLE_DIR))).toBe(true);
  expect(inlineAnalyser().threads).toBe(0);
});
