/**
 * STC figures through the upload API (lib/analysis/stc.ts): the step module gets none, with the
 * reason; a spec limit on Pmax at STC fails it as "not measurable" and no power class is given;
 * a 36-cell module under a batch default of 60 cells is flagged with 36 suggested; a curve at STC
 * keeps its measured figures; the batch's coefficients, entered later, give IEC 60891 procedure 1
 * figures to a module measured at 45 °C. Files: the demo step module M2611-015 (invented) and a
 * curve at 25 °C (M2611-001, invented); the reference module of Easwarakhanthan et al. (1986),
 * tests/fixtures/reference-data.
 */
import { readFileSync } from 'node:fs';
import path from 'node:path';
import { eq } from 'drizzle-orm';
import { member, user } from '@/db/schema';
import { batchSchema, curveDetailSchema } from '@/lib/schemas/responses';
import { signIn, signUp, startHarness } from '@/tests/server/harness';
import type { Harness } from '@/tests/server/harness';
import { REFERENCE_MODULE, readReference } from '@/tests/support/reference-data';

const DEMO = path.resolve(__dirname, '../../sample-data/batches/kf-m60-2611');
const stepFile = readFileSync(path.join(DEMO, 'M2611-015.csv'));
const stcFile = readFileSync(path.join(DEMO, 'M2611-001.csv'));
/** The reference module with metadata lines: 45 °C, 1000 W/m², no cell count (the batch's default applies). */
const module45 = ['# device: RTC-36M', '# cell temperature: 45', '# irradiance: 1000', readReference(REFERENCE_MODULE)].join('\n');

let h: Harness;
let tester: Awaited<ReturnType<typeof signUp>>;
let qa: Awaited<ReturnType<typeof signUp>>;
let batchId: string;
const curveOf = new Map<string, string>();

beforeAll(async () => {
  h = await startHarness();
  await signUp(h.app, { email: 'admin@stc-lab.example' });
  tester = await signUp(h.app, { email: 'tester@stc-lab.example' });
  await signUp(h.app, { email: 'qa@stc-lab.example' });
  const [q] = await h.database.db.select().from(user).where(eq(user.email, 'qa@stc-lab.example'));
  await h.database.db.update(member).set({ role: 'qa_lead' }).where(eq(member.userId, q.id));
  qa = await signIn(h.app, 'qa@stc-lab.example', 'correct-horse-9');
  // A 60-cell module batch without coefficients (they are entered later below).
  const b = await tester.post('/api/batches').send({ name: '60-cell modules', cells: 60, area_cm2: 16610 });
  expect(b.status).toBe(201);
  batchId = b.body.id;
  const up = await tester
    .post(`/api/batches/${batchId}/curves`)
    .attach('files', stepFile, 'M2611-015.csv')
    .attach('files', stcFile, 'M2611-001.csv')
    .attach('files', Buffer.from(module45), 'RTC-36M.csv');
  expect(up.status).toBe(201);
  expect(up.body.accepted).toBe(3);
  for (const r of up.body.results) curveOf.set(r.device_id, r.curve_id);
});
afterAll(async () => {
  await h.close();
});

const curveDetail = async (device: string) => {
  const res = await tester.get(`/api/curves/${curveOf.get(device)}`);
  expect(res.status).toBe(200);
  return curveDetailSchema.parse(res.body);
};

describe('STC figures from the upload', () => {
  it('the step module (24.4 °C, 1000 W/m²): no STC figures, the reason says "step", a flag says so, the list shows no STC Pmax', async () => {
    const c = await curveDetail('M2611-015');
    expect(c.stc?.method).toBe('none');
    expect(c.stc?.method === 'none' && c.stc.reason).toMatch(/the curve has a step/);
    expect(c.flags.map((f) => f.code)).toEqual(expect.arrayContaining(['step', 'poor-fit', 'stc-unavailable']));
    const page = await tester.get(`/api/batches/${batchId}/curves?sort=stc_pmp_w`);
    const row = page.body.curves.find((r: { device_id: string }) => r.device_id === 'M2611-015');
    expect(row.stc.method).toBe('none');
    expect(row.stc.pmp_w).toBeUndefined();
  });

  it('a module measured at 25.0 °C and 1000 W/m² keeps its measured figures as its STC figures', async () => {
    const c = await curveDetail('M2611-001');
    expect(c.stc?.method).toBe('measured');
    if (c.stc?.method !== 'measured') return;
    expect(c.stc.pmp_w).toBe(c.metrics.pmp_w);
    // Efficiency at STC from the file's area: Pmax/(1000 W/m² · 1.661 m²).
    expect(c.stc.efficiency).toBeCloseTo(c.metrics.pmp_w / 1661, 12);
  });

  it('the 36-cell module under the batch’s 60 cells: flags say the count contradicts Voc and suggest 36; no STC figures at 45 °C', async () => {
    const c = await curveDetail('RTC-36M');
    const byCode = new Map(c.flags.map((f) => [f.code, f.message]));
    expect(byCode.get('cells-check')).toMatch(/36 cells would give 0\.47 V a cell/);
    expect(byCode.get('cells-check')).toMatch(/The fits used 60 cells as given/);
    expect(byCode.has('voc-per-cell-unphysical')).toBe(true);
    expect(byCode.has('ideality-unphysical')).toBe(true);
    expect(c.stc?.method).toBe('none');
  });
});

describe('the spec on Pmax at STC', () => {
  it('a limit on it fails the step module as "not measurable" with the reason, and gives it no power class', async () => {
    const spec = await qa.post('/api/specs').send({ name: 'STC 250', limits: { stc_pmp_w: { min: 250 } }, power_classes: { step_w: 5, basis: 'stc_pmp_w' } });
    expect(spec.status).toBe(201);
    const ev = await qa.get(`/api/batches/${batchId}/evaluation?spec=${spec.body.id}`);
    expect(ev.status).toBe(200);
    type Reason = { kind: string; param: string; message: string };
    const step = ev.body.devices.find((d: { device_id: string }) => d.device_id === 'M2611-015');
    expect(step.result).toBe('fail');
    expect(step.power_class).toBeNull();
    const kinds = step.reasons.map((r: Reason) => [r.kind, r.param]);
    expect(kinds).toEqual([
      ['not_measurable', 'stc_pmp_w'],
      ['power_class', 'stc_pmp_w'],
    ]);
    for (const r of step.reasons as Reason[]) expect(r.message).toMatch(/the curve has a step/);
    // The module at STC passes and is classed on its measured Pmax.
    const ok = ev.body.devices.find((d: { device_id: string }) => d.device_id === 'M2611-001');
    expect(ok.power_class).toMatch(/^P\d+$/);
  });
});

describe('coefficients entered on the batch later', () => {
  it('recompute the STC figures: the 45 °C module (refitted with 36 cells) gets IEC 60891 procedure 1 figures', async () => {
    // Fit again with the right count first: the fits and flags follow, STC still has no method.
    const refit = await tester.post(`/api/curves/${curveOf.get('RTC-36M')}/refit`).send({ cells: 36 });
    expect(refit.status).toBe(200);
    expect(refit.body.flags.map((f: { code: string }) => f.code)).not.toContain('cells-check');
    expect(refit.body.stc.method).toBe('none');
    // Typical crystalline-silicon coefficients (common practice, docs/domain.md).
    const patch = await tester.patch(`/api/batches/${batchId}`).send({ alpha_pct_per_k: '0.05', beta_pct_per_k: '−0.35', gamma_pct_per_k: '-0.45', rs_ohm: '1.2' });
    expect(patch.status).toBe(200);
    const b = batchSchema.parse(patch.body);
    expect(b).toMatchObject({ alpha_pct_per_k: 0.05, beta_pct_per_k: -0.35, gamma_pct_per_k: -0.45, rs_ohm: 1.2, kappa_ohm_per_k: null });
    const c = await curveDetail('RTC-36M');
    expect(c.stc?.method).toBe('iec60891-1');
    if (c.stc?.method !== 'iec60891-1') return;
    expect(c.flags.map((f) => f.code)).not.toContain('stc-unavailable');
    expect(c.stc.inputs).toMatchObject({ alpha_pct_per_k: 0.05, beta_pct_per_k: -0.35, rs_ohm: 1.2, kappa_ohm_per_k: 0 });
    // Cooling by 20 K with β −0.35 %/K raises Voc by about 7 % (the Rs and κ = 0 terms aside: ±1 %).
    expect(Math.abs(c.stc.voc_v / c.metrics.voc_v - 1.07)).toBeLessThan(0.01);
    // The list and the evaluation see the new Pmax at STC.
    const page = await tester.get(`/api/batches/${batchId}/curves?sort=stc_pmp_w&dir=desc`);
    const row = page.body.curves.find((r: { device_id: string }) => r.device_id === 'RTC-36M');
    expect(row.stc.pmp_w).toBeCloseTo(c.stc.pmp_w, 9);
    // The step module stays without figures: a step rules every method out.
    expect((await curveDetail('M2611-015')).stc?.method).toBe('none');
  });
});
