/**
 * Measurement setups, the uncertainty each figure carries and the decision rules through the real
 * app (issue 18): a setup with a normal and a rectangular component on Pmax; a batch whose devices
 * sit just above a minimum; the same batch judged by a simple and by a guard-band spec through the
 * pass/fail CSV; PATCH /api/batches/:id { setup_id }; limits relative to the batch's nameplate.
 * Devices are simulated from the benchmark cell's published optimum (tests/fixtures/reference-data/README.md),
 * scaled; setups, limits and names are invented.
 */
import Papa from 'papaparse';
import { eq } from 'drizzle-orm';
import { member, user } from '@/db/schema';
import { simulateCurve } from '@/lib/iv';
import { signIn, signUp, startHarness } from '@/tests/server/harness';
import type { Harness } from '@/tests/server/harness';
import { checkExport } from '@/tests/support/export-checks';

type Agent = Awaited<ReturnType<typeof signUp>>;
const ORG = 'uncertainty-pv.example';

function cellFile(device: string, scale: number): Buffer {
  const c = simulateCurve({ iph_a: 0.760788 * scale, i0_a: 3.1068e-7, n: 1.47727, rs_ohm: 0.036547, rsh_ohm: 52.89 }, { cells: 1, temp_c: 33, points: 30 });
  return Buffer.from([`# device: ${device}`, '# cell temperature: 33', 'V,I', ...c.voltage_v.map((v, k) => `${v},${c.current_a[k]}`)].join('\n'));
}

let h: Harness;
let tester: Agent, qa: Agent, designer: Agent, outsider: Agent;
let batchId: string, setupId: string;
/** Pmax of each device as the API reports it. */
let pmax: Map<string, number>;

// Normal 2 % at k = 2 → u = 1 %; rectangular half-width 1.5 % → u = 1.5/√3 = 0.866025 %.
// u_c = √(1 + 0.75) = 1.322876 %; U (k = 2) = 2.645751 % (worked by hand, GUM 4.3.3, 4.3.7, 5.1.2).
const U_PCT = 2 * Math.sqrt(1 + 1.5 ** 2 / 3);
const components = [
  { name: 'Tester calibration', acts_on: 'pmp', value: 2, unit: '%', distribution: 'normal', k: 2 },
  { name: 'Non-uniformity effect on Pmax', acts_on: 'pmp', value: 1.5, unit: '%', distribution: 'rectangular' },
];

beforeAll(async () => {
  h = await startHarness();
  await signUp(h.app, { email: `admin@${ORG}` });
  tester = await signUp(h.app, { email: `tester@${ORG}` });
  await signUp(h.app, { email: `qa@${ORG}` });
  await signUp(h.app, { email: `designer@${ORG}` });
  for (const [email, role] of [[`qa@${ORG}`, 'qa_lead'], [`designer@${ORG}`, 'designer']]) {
    const [u] = await h.database.db.select().from(user).where(eq(user.email, email));
    await h.database.db.update(member).set({ role }).where(eq(member.userId, u.id));
  }
  qa = await signIn(h.app, `qa@${ORG}`, 'correct-horse-9');
  designer = await signIn(h.app, `designer@${ORG}`, 'correct-horse-9');
  outsider = await signUp(h.app, { email: `qa@elsewhere-pv.example` });
  const [o] = await h.database.db.select().from(user).where(eq(user.email, 'qa@elsewhere-pv.example'));
  await h.database.db.update(member).set({ role: 'qa_lead' }).where(eq(member.userId, o.id));
  batchId = (await tester.post('/api/batches').send({ name: 'Guard band lot', cells: 1 })).body.id;
  let req = tester.post(`/api/batches/${batchId}/curves`);
  ['D1', 'D2', 'D3'].forEach((name, k) => (req = req.attach('files', cellFile(name, 1 + k * 0.05), `${name}.csv`)));
  expect((await req).body.accepted).toBe(3);
  const list = (await designer.get(`/api/batches/${batchId}/curves?page_size=50`)).body.curves as { device_id: string; metrics: { pmp_w: number } }[];
  pmax = new Map(list.map((c) => [c.device_id, c.metrics.pmp_w]));
}, 120_000);
afterAll(async () => {
  await h.close();
});

describe('measurement setups', () => {
  it('a QA lead creates one; the answer gives the expanded uncertainties; the first is the default', async () => {
    const res = await qa.post('/api/setups').send({ name: 'Line 1 tester', components });
    expect(res.status).toBe(201);
    setupId = res.body.id;
    expect(res.body.is_default).toBe(true);
    expect(res.body.u_pmp_pct_k2).toBeCloseTo(U_PCT, 10);
    expect(res.body.u_pmp_pct_k2).toBeCloseTo(2.645751, 5);
    // Components on Pmax alone touch neither Isc nor Voc.
    expect([res.body.u_isc_pct_k2, res.body.u_voc_pct_k2]).toEqual([0, 0]);
    expect((await designer.get('/api/setups')).body.setups.map((s: { id: string }) => s.id)).toEqual([setupId]);
    expect((await tester.post('/api/setups').send({ name: 'x', components: [] })).status).toBe(403);
  });

  it('refuses a normal component without k, in words', async () => {
    const res = await qa.post('/api/setups').send({ name: 'Bad', components: [{ name: 'Ref', acts_on: 'irradiance', value: 1, unit: '%', distribution: 'normal' }] });
    expect(res.status).toBe(400);
    expect(res.body.message).toMatch(/coverage factor k/);
  });

  it('PATCH /api/batches/:id names the setup; another organisation\'s setup is refused', async () => {
    const made = await outsider.post('/api/setups').send({ name: 'Theirs', components });
    expect(made.status).toBe(201);
    const theirs = made.body.id as string;
    const bad = await tester.patch(`/api/batches/${batchId}`).send({ setup_id: theirs });
    expect(bad.status).toBe(400);
    const ok = await tester.patch(`/api/batches/${batchId}`).send({ setup_id: setupId });
    expect(ok.status).toBe(200);
    expect(ok.body.setup_id).toBe(setupId);
    expect((await outsider.get(`/api/setups/${setupId}`)).status).toBe(404);
  });
});

describe('the same batch by a simple and by a guard-band spec, through the pass/fail CSV', () => {
  it('devices just above the minimum pass the simple rule and fail the guard band; the CSV says both', async () => {
    // The minimum sits 1 % below D2's Pmax: D2 (and D3, 5 % higher) meet it; D1, 5 % lower, does not.
    // With U = 2.65 % of Pmax, D2 is inside the guard band; D3 clears it (5 % + 1 % above the minimum… > U).
    const min = Number((pmax.get('D2')! * 0.99).toFixed(4));
    const make = async (rule: string) => (await qa.post('/api/specs').send({ name: `Pmax ≥ ${min} W, ${rule}`, limits: { pmp_w: { min } }, decision_rule: rule })).body.id as string;
    const simple = await make('simple');
    const guard = await make('guard_band');
    const read = async (spec: string) => {
      const res = await designer.get(`/api/batches/${batchId}/pass-fail.csv?spec=${spec}`);
      expect(res.status).toBe(200);
      checkExport(res.text, 3);
      const rows = Papa.parse<Record<string, string>>(res.text, { header: true }).data;
      return new Map(rows.map((r) => [r.device_id, r]));
    };
    const s = await read(simple);
    const g = await read(guard);
    expect([s.get('D1')!.result, s.get('D2')!.result, s.get('D3')!.result]).toEqual(['fail', 'pass', 'pass']);
    expect([g.get('D1')!.result, g.get('D2')!.result, g.get('D3')!.result]).toEqual(['fail', 'fail', 'pass']);
    for (const r of s.values()) expect(r.decision_rule).toBe('simple');
    for (const r of g.values()) expect(r.decision_rule).toBe('guard_band');
    // Each device's Pmax carries U = 2.645751 % of it, rounded like pmp_w (4 decimals).
    for (const [id, r] of g) expect(Number(r.u_pmp_w)).toBeCloseTo((pmax.get(id)! * U_PCT) / 100, 4);
    expect(g.get('D2')!.reasons).toMatch(/^Pmax [\d.]+ ± [\d.]+ W does not clear the minimum [\d.]+ W by its uncertainty \(guard-band rule\)$/);
    expect(s.get('D1')!.reasons).toMatch(/is below the minimum .* \(simple rule\)$/);
    expect(g.get('D2')!.in_guard_band).toBe('yes');
    // The evaluation counts the devices inside the guard band and names the setup.
    const e = (await designer.get(`/api/batches/${batchId}/evaluation?spec=${guard}`)).body;
    expect(e.decision_rule).toBe('guard_band');
    expect(e.inside_guard_band).toBe(1);
    expect(e.setup).toMatchObject({ id: setupId, name: 'Line 1 tester' });
    expect(e.devices.find((d: { device_id: string }) => d.device_id === 'D2').uncertainty.u_pmp_w).toBeCloseTo((pmax.get('D2')! * U_PCT) / 100, 9);
  });

  it('an edit of the setup reaches the next answer (the batch revision moves)', async () => {
    const spec = (await qa.post('/api/specs').send({ name: 'any', limits: { pmp_w: { min: 0 } } })).body.id;
    const before = (await designer.get(`/api/batches/${batchId}/evaluation?spec=${spec}`)).body.devices[0].uncertainty.u_pmp_w as number;
    const res = await qa.patch(`/api/setups/${setupId}`).send({ components: [components[0]] });
    expect(res.status).toBe(200);
    expect(res.body.u_pmp_pct_k2).toBeCloseTo(2, 10); // 2 × (2 % / 2)
    const after = (await designer.get(`/api/batches/${batchId}/evaluation?spec=${spec}`)).body.devices[0].uncertainty.u_pmp_w as number;
    expect(after / before).toBeCloseTo(2 / U_PCT, 9);
    const csv = (await designer.get(`/api/compare/comparison.csv?batches=${batchId}&param=pmp_w&spec=${spec}`)).text;
    const rows = Papa.parse<Record<string, string>>(csv, { header: true }).data;
    expect(rows.every((r) => Number(r.u_pmp_w) > 0 && r.decision_rule === 'simple')).toBe(true);
  });
});

describe('limits relative to the nameplate', () => {
  it('judges Pmax against the batch\'s nameplate and says so', async () => {
    const nameplate = Number((pmax.get('D2')! - 0.001).toFixed(4));
    await tester.patch(`/api/batches/${batchId}`).send({ nameplate_w: nameplate });
    const spec = (await qa.post('/api/specs').send({ name: 'Nameplate − 0 W', nameplate_limits: { pmp_w: { below_w: 0 } } })).body.id;
    const e = (await designer.get(`/api/batches/${batchId}/evaluation?spec=${spec}`)).body;
    const result = Object.fromEntries(e.devices.map((d: { device_id: string; result: string }) => [d.device_id, d.result]));
    expect(result).toEqual({ D1: 'fail', D2: 'pass', D3: 'pass' });
    const d1 = e.devices.find((d: { device_id: string }) => d.device_id === 'D1');
    expect(d1.reasons[0].message).toContain(`(nameplate − 0 W of ${nameplate} W)`);
  });
});
