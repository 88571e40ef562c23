/**
 * The characterisation through the API: curves of the invented module of
 * tests/lib/analysis/characterise/synthetic.ts uploaded as one device ("keep both"), the answer's
 * coefficients and matrix, a device with too few curves answered with a reason, and the explicit
 * save of the coefficients on the batch (the batch edit, which works the STC figures out again).
 */
import { characterisationAnswerSchema } from '@/lib/schemas/characterisation-answer';
import { signUp, startHarness } from '@/tests/server/harness';
import type { Harness } from '@/tests/server/harness';
import { MODULE, synthCurve, truthPmax } from '@/tests/lib/analysis/characterise/synthetic';

jest.setTimeout(180_000);

let h: Harness;
let tester: Awaited<ReturnType<typeof signUp>>;
let batchId: string;

function file(g: number, t: number, device = 'CHZ-1'): Buffer {
  const c = synthCurve(g, t, 120);
  const lines = [`# device: ${device}`, `# irradiance: ${g} W/m2`, `# cell temperature: ${t} °C`, `# cells: ${MODULE.cells}`, 'V,I'];
  c.voltage_v.forEach((v, k) => lines.push(`${v.toFixed(5)},${c.current_a[k].toFixed(6)}`));
  return Buffer.from(lines.join('\n'));
}

beforeAll(async () => {
  h = await startHarness();
  await signUp(h.app, { email: 'admin@charz-lab.example' });
  tester = await signUp(h.app, { email: 'tester@charz-lab.example' });
  const b = await tester.post('/api/batches').send({ name: 'Characterisation run', cells: 60 });
  expect(b.status).toBe(201);
  batchId = b.body.id;
  let req = tester.post(`/api/batches/${batchId}/curves`).field('on_duplicate', 'keep');
  for (const t of [15, 25, 50, 75]) req = req.attach('files', file(1000, t), `chz-1000-${t}.csv`);
  for (const g of [200, 400, 600, 800]) req = req.attach('files', file(g, 25), `chz-${g}-25.csv`);
  req = req.attach('files', file(1000, 25, 'OTHER-1'), 'other.csv');
  const up = await req;
  expect(up.status).toBe(201);
  expect(up.body.accepted).toBe(9);
});
afterAll(async () => {
  await h.close();
});

it('characterises the device with the most curves: coefficients, IEC 60891 parameters, matrix', async () => {
  const res = await tester.get(`/api/batches/${batchId}/characterisation`);
  expect(res.status).toBe(200);
  const a = characterisationAnswerSchema.parse(res.body);
  expect(a.device_id).toBe('CHZ-1');
  expect(a.devices).toEqual([
    { device_id: 'CHZ-1', curves: 8 },
    { device_id: 'OTHER-1', curves: 1 },
  ]);
  expect(a.reason).toBeNull();
  const c = a.characterisation!;
  expect(c.alpha_isc_pct_per_k).toBeCloseTo(MODULE.alpha_rel_per_k * 100, 2);
  const p1 = c.iec60891.procedure1;
  expect('error' in p1 ? p1.error : p1.rs_ohm).toBeCloseTo(MODULE.rs_ohm, 1);
  for (const cell of c.matrix) expect(Math.abs(cell.pmp_w / truthPmax(cell.irradiance_wm2, cell.temp_c) - 1)).toBeLessThan(0.01);
  expect(a.sources.map((s) => s.curve_id)).toEqual(expect.arrayContaining(c.matrix.filter((m) => m.source === 'measured').map((m) => m.curve)));
});

it('answers a device with too few curves with the reason, and an unknown device with its own', async () => {
  const one = characterisationAnswerSchema.parse((await tester.get(`/api/batches/${batchId}/characterisation?device=OTHER-1`)).body);
  expect(one.characterisation).toBeNull();
  expect(one.reason).toMatch(/^No characterisation: a characterisation needs at least 3 curves/);
  // Every curve of the batch: the other device's curve at 1000 W/m² and 25 °C joins the set.
  const all = characterisationAnswerSchema.parse((await tester.get(`/api/batches/${batchId}/characterisation?device=*`)).body);
  expect(all.device_id).toBe('*');
  expect(all.characterisation?.curves).toBe(9);
  const none = characterisationAnswerSchema.parse((await tester.get(`/api/batches/${batchId}/characterisation?device=NOPE`)).body);
  expect(none.reason).toBe('The batch has no curves of device NOPE.');
});

it('saves the coefficients on the batch only when asked (the batch edit)', async () => {
  const before = await tester.get(`/api/batches/${batchId}`);
  expect(before.body.alpha_pct_per_k).toBeNull();
  const a = characterisationAnswerSchema.parse((await tester.get(`/api/batches/${batchId}/characterisation`)).body).characterisation!;
  const p1 = a.iec60891.procedure1;
  if ('error' in p1) throw new Error(p1.error);
  const saved = await tester.patch(`/api/batches/${batchId}`).send({ alpha_pct_per_k: a.alpha_isc_pct_per_k, beta_pct_per_k: a.beta_voc_pct_per_k, gamma_pct_per_k: a.gamma_pmp_pct_per_k, rs_ohm: p1.rs_ohm, kappa_ohm_per_k: p1.kappa_ohm_per_k });
  expect(saved.status).toBe(200);
  expect(saved.body.beta_pct_per_k).toBeCloseTo(a.beta_voc_pct_per_k, 9);
});
