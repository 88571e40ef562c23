/**
 * The store step of a queued fit (server/services/analysis-jobs.ts fitQueuedCurves), through the
 * real app's upload on the test database (in-memory PGlite; a PostgreSQL server in `.ci/run`'s
 * second run): curves uploaded `queued` (an analyser with a recording queue instead of pg-boss),
 * then fitted as a worker would. A job taken twice at once stores once; a fit that fails marks its
 * curve `failed` with the reason; the columns and the comparison record are those of the fit.
 */
import { eq, inArray } from 'drizzle-orm';
import { curve, fit } from '@/db/schema';
import { simulateCurve } from '@/lib/iv';
import { comparisonRecordFields } from '@/lib/quality/comparison-record';
import { fitQueuedCurves } from '@/server/services/analysis-jobs';
import type { QueuedAnalyser } from '@/server/services/analysis-jobs';
import { inlineAnalyser } from '@/server/services/analysis-pool';
import type { Analyser } from '@/server/services/analysis-pool';
import { signUp, startHarness } from '@/tests/server/harness';
import type { Harness } from '@/tests/server/harness';

const ORG = 'queued-fits.example';
const inline = inlineAnalyser();
const queued: string[] = [];
const queuedAnalyser: QueuedAnalyser = {
  ...inline,
  queue: { enqueue: async (ids) => void queued.push(...ids), cancel: async () => undefined, boss: undefined as never },
};

/** A cell curve simulated from the benchmark cell's published optimum (tests/fixtures/reference-data/README.md). */
function cellFile(device: string, scale: number): Buffer {
  const c = simulateCurve({ iph_a: 0.760788 * scale, i0_a: 3.1068e-7, n: 1.47727, rs_ohm: 0.036547, rsh_ohm: 52.89 }, { cells: 1, temp_c: 33, points: 30 });
  return Buffer.from([`# device: ${device}`, '# cell temperature: 33', 'V,I', ...c.voltage_v.map((v, k) => `${v},${c.current_a[k]}`)].join('\n'));
}

let h: Harness;
let tester: Awaited<ReturnType<typeof signUp>>;

beforeAll(async () => {
  h = await startHarness({ analyser: queuedAnalyser });
  await signUp(h.app, { email: `admin@${ORG}` });
  tester = await signUp(h.app, { email: `tester@${ORG}` });
});
afterAll(async () => h.close());

async function queuedBatch(name: string, devices: string[]): Promise<string[]> {
  const b = (await tester.post('/api/batches').send({ name, cells: 1 })).body;
  let req = tester.post(`/api/batches/${b.id}/curves`);
  devices.forEach((d, k) => (req = req.attach('files', cellFile(d, 1 + k / 100), `${d}.csv`)));
  const up = await req;
  expect(up.status).toBe(201);
  return up.body.results.map((r: { curve_id: string }) => r.curve_id);
}

describe('fits of queued curves', () => {
  it('uploads store the curves queued and queue a job each', async () => {
    const ids = await queuedBatch('queued', ['Q-1', 'Q-2']);
    expect(queued).toEqual(expect.arrayContaining(ids));
    const rows = await h.database.db.select({ status: curve.status, fitted: curve.fitted }).from(curve).where(inArray(curve.id, ids));
    expect(rows).toEqual([
      { status: 'queued', fitted: false },
      { status: 'queued', fitted: false },
    ]);
  });

  it('a job taken twice at once stores its fits once; the columns and the record are the fit’s', async () => {
    const ids = await queuedBatch('twice', ['T-1', 'T-2', 'T-3']);
    await Promise.all([fitQueuedCurves(h.database.db, inline, ids), fitQueuedCurves(h.database.db, inline, ids)]);
    const rows = await h.database.db.select().from(curve).where(inArray(curve.id, ids));
    for (const r of rows) {
      expect(r.status).toBe('done');
      expect(r.statusReason).toBeNull();
      expect(r.fitted).toBe(true);
      // The fit of a curve simulated with n = 1.47727 finds it again (the same published optimum).
      expect(r.n).toBeCloseTo(1.47727, 2);
      const record = comparisonRecordFields(JSON.parse(r.record!));
      expect(record).toMatchObject({ curve_id: r.id, device_id: r.deviceId, batch_id: r.batchId, fitted: true, flagCodes: r.flagCodes });
      expect(record.metrics.pmp_w).toBe(r.pmp_w);
    }
    const fits = await h.database.db.select({ curveId: fit.curveId, model: fit.model }).from(fit).where(inArray(fit.curveId, ids));
    // One fit per model and curve, not two: the second taker found the curves done.
    expect(fits.length).toBe(new Set(fits.map((f) => `${f.curveId} ${f.model}`)).size);
    expect(new Set(fits.map((f) => f.curveId))).toEqual(new Set(ids));
    // Taken again later (a retried job): nothing changes.
    await fitQueuedCurves(h.database.db, inline, ids);
    expect((await h.database.db.select({ id: fit.id }).from(fit).where(inArray(fit.curveId, ids))).length).toBe(fits.length);
  });

  it('a fit that fails marks its curve failed with the reason and stores no fit; the others are stored', async () => {
    const ids = await queuedBatch('failing', ['F-ok', 'F-bad']);
    const failing: Analyser = {
      ...inline,
      analyse: async (req) => ('curve' in req && req.curve.meta.device_id === 'F-bad' ? { ok: false, kind: 'failure', message: 'the solver diverged' } : inline.analyse(req)),
    };
    await fitQueuedCurves(h.database.db, failing, ids);
    const rows = await h.database.db.select({ id: curve.id, deviceId: curve.deviceId, status: curve.status, statusReason: curve.statusReason }).from(curve).where(inArray(curve.id, ids));
    const bad = rows.find((r) => r.deviceId === 'F-bad')!;
    const ok = rows.find((r) => r.deviceId === 'F-ok')!;
    expect(bad).toMatchObject({ status: 'failed', statusReason: 'The fits could not be computed: the solver diverged' });
    expect(ok.status).toBe('done');
    const fits = await h.database.db.select({ curveId: fit.curveId }).from(fit).where(inArray(fit.curveId, ids));
    expect(fits.every((f) => f.curveId === ok.id)).toBe(true);
    expect(fits.length).toBeGreaterThan(0);
    // The curve list says so too.
    const batchId = (await h.database.db.select({ b: curve.batchId }).from(curve).where(eq(curve.id, bad.id)))[0].b;
    const list = await tester.get(`/api/batches/${batchId}/curves`);
    expect(list.status).toBe(200);
    expect(JSON.stringify(list.body)).toContain('the solver diverged');
  });
});
