/**
 * GET /api/physics/batches/:id through the real app: J0 per cell area and the implied Voc of every
 * device of a batch, checked against a computation done here from the stored fit alone —
 * J0 = I0/(area/cells), implied Voc = n·Ns·kT/q·ln(Jsc/J0 + 1) — and, at 25 °C, J0 moved by
 * I0 ∝ n_i(T)^(2/n) with an n_i(T) built here from the published silicon values docs/domain.md
 * cites (n_i(300 K) = 9.65×10⁹ cm⁻³, Altermatt et al. 2003; Nc, Nv ∝ T^1.5, Green 1990; Eg(T) in
 * the Varshni form 1.17 − 4.73×10⁻⁴·T²/(T + 636) eV, memory), not the library's model. Devices
 * without a usable fit are listed with a reason; another organisation's batch is not found.
 */
import { readFileSync } from 'node:fs';
import path from 'node:path';
import { and, eq, sql } from 'drizzle-orm';
import { curve, fit } from '@/db/schema';
import { circuitCurve, singleDiodeCircuit } from '@/lib/physics';
import { batchPhysicsAnswerSchema } from '@/lib/schemas/batch-physics-answer';
import type { BatchPhysicsAnswer } from '@/lib/schemas/batch-physics-answer';
import { signUp, startHarness } from '@/tests/server/harness';
import type { Harness } from '@/tests/server/harness';
import { REFERENCE_DATA_DIR } from '@/tests/support/reference-data';

// CODATA 2018 exact constants (docs/domain.md), typed here on purpose.
const Q = 1.602176634e-19;
const KB = 1.380649e-23;
const KB_EV = KB / Q;
const vt = (temp_c: number) => (KB * (temp_c + 273.15)) / Q;
/** n_i(T) of silicon from the values docs/domain.md cites (see the header), cm⁻³. */
const egVarshni = (t: number) => 1.17 - (4.73e-4 * t * t) / (t + 636);
const niDomain = (t: number) => 9.65e9 * (t / 300) ** 1.5 * Math.exp(-egVarshni(t) / (2 * KB_EV * t) + egVarshni(300) / (2 * KB_EV * 300));
const rel = (a: number, b: number) => Math.abs(a / b - 1);
const median = (v: number[]) => {
  const s = [...v].sort((a, b) => a - b);
  const m = Math.floor(s.length / 2);
  return s.length % 2 ? s[m] : (s[m - 1] + s[m]) / 2;
};

const moduleCsv = readFileSync(path.join(REFERENCE_DATA_DIR, 'module-36cell-45C.csv'), 'utf8');
/** A synthetic 36-cell module at `temp_c` (README true-current optimum of the benchmark module, I0 scaled). */
function syntheticCsv(temp_c: number, i0_a: number) {
  const c = circuitCurve(singleDiodeCircuit({ iph_a: 1.03, i0_a, n: 1.32, rs_ohm: 1.2, rsh_ohm: 800 }), 36, temp_c, { points: 121, v_min_v: 0, v_max_v: 18.5 });
  return ['V,I', ...c.voltage_v.map((v, k) => `${v.toFixed(5)},${c.current_a[k].toFixed(6)}`)].join('\n');
}

type Agent = Awaited<ReturnType<typeof signUp>>;
let h: Harness;
let tester: Agent;
let outsider: Agent;
let lotId: string;
let noAreaId: string;
let brokenCurve: string;

async function upload(batchId: string, name: string, csv: string, temp_c: number) {
  const up = await tester.post(`/api/batches/${batchId}/curves`).field('temp_c', String(temp_c)).field('irradiance_w_m2', '1000').attach('files', Buffer.from(csv), name);
  expect(up.status).toBe(201);
  return up.body.results[0].curve_id as string;
}

/** The stored current single-diode fit of a curve: the only input of the independent computation. */
async function storedFit(curveId: string) {
  const [f] = await h.database.db.select().from(fit).where(and(eq(fit.curveId, curveId), eq(fit.current, true), eq(fit.model, 'single-diode')));
  const [c] = await h.database.db.select({ isc_a: curve.isc_a }).from(curve).where(eq(curve.id, curveId));
  const r = f.result as { i0_a: number; n: number };
  return { i0_a: r.i0_a, n: r.n, temp_c: f.conditions.temp_c as number, cells: f.conditions.cells as number, isc_a: c.isc_a };
}

beforeAll(async () => {
  h = await startHarness();
  await signUp(h.app, { email: 'admin@kappa-pv.example' });
  tester = await signUp(h.app, { email: 'tester@kappa-pv.example' });
  await signUp(h.app, { email: 'boss@other-pv.example' });
  outsider = await signUp(h.app, { email: 'tester@other-pv.example' });
  // 36 cells over 3600 cm²: 100 cm² a cell.
  lotId = (await tester.post('/api/batches').send({ name: 'Lot 45/60', cells: 36, area_cm2: 3600 })).body.id;
  await upload(lotId, 'M-01.csv', moduleCsv, 45);
  await upload(lotId, 'M-02.csv', syntheticCsv(60, 4e-6), 60);
  await upload(lotId, 'M-03.csv', syntheticCsv(45, 2e-6), 45);
  brokenCurve = await upload(lotId, 'M-04.csv', syntheticCsv(45, 3e-6), 45);
  // A fit that did not converge, as the analysis stores one: converged false, the message saying why.
  await h.database.db
    .update(fit)
    .set({ result: sql`${fit.result} || '{"converged": false, "message": "the step limit was reached"}'::jsonb` })
    .where(and(eq(fit.curveId, brokenCurve), eq(fit.model, 'single-diode')));
  noAreaId = (await tester.post('/api/batches').send({ name: 'No area', cells: 36 })).body.id;
  await upload(noAreaId, 'N-01.csv', moduleCsv, 45);
}, 120_000);
afterAll(async () => {
  await h.close();
});

describe('GET /api/physics/batches/:id', () => {
  let a: BatchPhysicsAnswer;
  beforeAll(async () => {
    const res = await tester.get(`/api/physics/batches/${lotId}`);
    expect(res.status).toBe(200);
    a = batchPhysicsAnswerSchema.parse(res.body);
  });

  it('lists every curve, the one without a converged fit with its reason and no figures', () => {
    expect(a.devices.map((d) => d.device_id)).toEqual(['M-01', 'M-02', 'M-03', 'M-04']);
    const broken = a.devices.find((d) => d.curve_id === brokenCurve)!;
    expect(broken.reason).toMatch(/did not converge: the step limit was reached/);
    expect([broken.j0_a_cm2, broken.implied_voc_v, broken.implied_voc_25c_v]).toEqual([null, null, null]);
    expect(a.summary).toEqual(expect.objectContaining({ total: 4, usable: 3 }));
  });

  it('J0 = I0/(area/cells) and implied Voc = n·Ns·kT/q·ln(Jsc/J0 + 1) at the fit temperature, as computed here', async () => {
    for (const d of a.devices.filter((x) => x.curve_id !== brokenCurve)) {
      const f = await storedFit(d.curve_id);
      expect(f.cells).toBe(36);
      const cellArea = 3600 / 36;
      const j0 = f.i0_a / cellArea;
      const jsc = f.isc_a / cellArea;
      expect(d.reason).toBeNull();
      expect(rel(d.cell_area_cm2!, 100)).toBeLessThan(1e-12);
      expect(rel(d.j0_a_cm2!, j0)).toBeLessThan(1e-12);
      expect(rel(d.jsc_a_cm2!, jsc)).toBeLessThan(1e-12);
      expect(d.temp_c).toBe(f.temp_c);
      expect(rel(d.implied_voc_v!, f.n * 36 * vt(f.temp_c) * Math.log(jsc / j0 + 1))).toBeLessThan(1e-9);
      // A module's implied Voc sits near its measured Voc (the fit reproduces the curve).
      expect(Math.abs(d.implied_voc_v! - d.measured_voc_v) / 36).toBeLessThan(0.01);
    }
  });

  it('at 25 °C J0 follows n_i(T)^(2/n) (n_i from the published values) and the implied Voc rises about 2 mV/K a cell', async () => {
    for (const d of a.devices.filter((x) => x.curve_id !== brokenCurve)) {
      const f = await storedFit(d.curve_id);
      const t1 = f.temp_c + 273.15;
      const j0_25 = (f.i0_a / 100) * (niDomain(298.15) / niDomain(t1)) ** (2 / f.n);
      const voc25 = f.n * 36 * vt(25) * Math.log(f.isc_a / 100 / j0_25 + 1);
      // The library's n_i (Couderc et al. 2014) and this one differ by 1.6–2.6 % in the ratio
      // n_i(25 °C)/n_i(T) for 45–60 °C, about 1.3 mV a cell on the Voc: 2 mV a cell allowed.
      expect(Math.abs(Math.log(d.j0_25c_a_cm2! / j0_25))).toBeLessThan(0.06);
      expect(Math.abs(d.implied_voc_25c_v! - voc25) / 36).toBeLessThan(0.002);
      // Cooling 20–35 K raises Voc by ~2 mV/K a cell in crystalline silicon (β ≈ −0.3 %/K, common practice).
      const perCellPerK = (d.implied_voc_25c_v! - d.implied_voc_v!) / 36 / (f.temp_c - 25);
      expect(perCellPerK).toBeGreaterThan(0.0015);
      expect(perCellPerK).toBeLessThan(0.0028);
    }
  });

  it('the summary holds the median, quartiles and range of the devices that have a value', () => {
    const v = a.devices.map((d) => d.implied_voc_v).filter((x): x is number => x != null);
    expect(v).toHaveLength(3);
    const s = a.summary.implied_voc_v!;
    expect(s.median).toBeCloseTo(median(v), 12);
    expect(s.min).toBe(Math.min(...v));
    expect(s.max).toBe(Math.max(...v));
    // Three sorted values x0 ≤ x1 ≤ x2: quartiles (definition 7) at (x0 + x1)/2 and (x1 + x2)/2.
    const sorted = [...v].sort((x, y) => x - y);
    expect(s.p25).toBeCloseTo((sorted[0] + sorted[1]) / 2, 12);
    expect(s.p75).toBeCloseTo((sorted[1] + sorted[2]) / 2, 12);
    const j = a.devices.map((d) => d.j0_a_cm2).filter((x): x is number => x != null);
    expect(a.summary.j0_a_cm2!.median).toBeCloseTo(median(j), 20);
    expect(a.summary.implied_voc_25c_v).not.toBeNull();
  });

  it('without a device area J0 is missing with its reason; the implied Voc needs none', async () => {
    const b = batchPhysicsAnswerSchema.parse((await tester.get(`/api/physics/batches/${noAreaId}`)).body);
    const [d] = b.devices;
    expect(d.j0_a_cm2).toBeNull();
    expect(d.reason).toMatch(/device area/);
    const f = await storedFit(d.curve_id);
    expect(rel(d.implied_voc_v!, f.n * 36 * vt(f.temp_c) * Math.log(f.isc_a / f.i0_a + 1))).toBeLessThan(1e-9);
    expect(b.summary.j0_a_cm2).toBeNull();
    expect(b.summary.usable).toBe(1);
  });

  it('another organisation’s batch and an unknown id are not found', async () => {
    const res = await outsider.get(`/api/physics/batches/${lotId}`);
    expect(res.status).toBe(404);
    expect(res.body.code).toBe('not_found');
    expect((await tester.get('/api/physics/batches/no-such-batch')).status).toBe(404);
  });
});
