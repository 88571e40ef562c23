/**
 * The device-physics API through the real app: every role may use it, another organisation's
 * curve is not found, bad input names itself, and the numbers agree with the library's sources
 * and with arithmetic done by hand here. The benchmark module (Easwarakhanthan et al. 1986, see
 * tests/fixtures/reference-data/README.md) is uploaded and fitted like any user's file.
 */
import { readFileSync } from 'node:fs';
import path from 'node:path';
import { eq } from 'drizzle-orm';
import request from 'supertest';
import { member, user } from '@/db/schema';
import { circuitCurve, singleDiodeCircuit } from '@/lib/physics';
import { signUp, startHarness } from '@/tests/server/harness';
import type { Harness } from '@/tests/server/harness';
import { REFERENCE_DATA_DIR } from '@/tests/support/reference-data';
import { coefficientLabel } from '@/lib/schemas/physics';

const REF = REFERENCE_DATA_DIR;
const moduleCsv = readFileSync(path.join(REF, 'module-36cell-45C.csv'), 'utf8');
const cellCsv = readFileSync(path.join(REF, 'cell-57mm-33C.csv'), 'utf8');

// CODATA 2018 exact constants (DOMAIN.md), typed here on purpose: the test checks the app's arithmetic.
const Q = 1.602176634e-19;
const KB = 1.380649e-23;
const vt = (temp_c: number) => (KB * (temp_c + 273.15)) / Q;
const rel = (a: number, b: number) => Math.abs(a / b - 1);

type Agent = Awaited<ReturnType<typeof signUp>>;
let h: Harness;
const agents: Record<'admin' | 'test_engineer' | 'designer' | 'qa_lead', Agent> = {} as never;
let outsider: Agent;
let moduleId: string;
let cellId: string;
let denseId: string;

async function setRole(email: string, role: string) {
  const [u] = await h.database.db.select().from(user).where(eq(user.email, email));
  await h.database.db.update(member).set({ role }).where(eq(member.userId, u.id));
}

beforeAll(async () => {
  h = await startHarness();
  agents.admin = await signUp(h.app, { email: 'admin@lambda-pv.example' }); // first of the domain: admin
  agents.test_engineer = await signUp(h.app, { email: 'tester@lambda-pv.example' });
  agents.designer = await signUp(h.app, { email: 'designer@lambda-pv.example' });
  agents.qa_lead = await signUp(h.app, { email: 'qa@lambda-pv.example' });
  await setRole('designer@lambda-pv.example', 'designer');
  await setRole('qa@lambda-pv.example', 'qa_lead');
  await signUp(h.app, { email: 'boss@mu-other.example' });
  outsider = await signUp(h.app, { email: 'tester@mu-other.example' });

  const tester = agents.test_engineer;
  // 36 cells over 3600 cm²: 100 cm² per cell, so J0 = I0/100 cm² (definition, by hand).
  // β and γ near the fitted model's own (about −0.50 and −0.65 %/K, tests/lib/analysis/stc.test.ts) and no α:
  // the STC figures of this 45 °C curve come from the model (lib/analysis/stc.ts), whose check they pass.
  const withArea = await tester.post('/api/batches').send({ name: 'Module with area', cells: 36, area_cm2: 3600, beta_pct_per_k: -0.5, gamma_pct_per_k: -0.65 });
  const up = await tester
    .post(`/api/batches/${withArea.body.id}/curves`)
    .field('temp_c', '45')
    .field('cells', '36')
    .field('irradiance_w_m2', '1000')
    .attach('files', Buffer.from(moduleCsv), 'module-36cell-45C.csv');
  expect(up.status).toBe(201);
  moduleId = up.body.results[0].curve_id;

  // A dense synthetic curve of the same module (401 points) to see the translated curve thinned.
  const p = { iph_a: 1.031434, i0_a: 2.6381e-6, n: 1.32217, rs_ohm: 1.235634, rsh_ohm: 821.64 }; // README true-current optimum
  const dense = circuitCurve(singleDiodeCircuit(p), 36, 45, { points: 401, v_min_v: 0, v_max_v: 17.6 });
  const denseCsv = ['V,I', ...dense.voltage_v.map((v, k) => `${v.toFixed(5)},${dense.current_a[k].toFixed(6)}`)].join('\n');
  const up2 = await tester
    .post(`/api/batches/${withArea.body.id}/curves`)
    .field('temp_c', '45')
    .field('cells', '36')
    .field('irradiance_w_m2', '1000')
    .attach('files', Buffer.from(denseCsv), 'dense-module.csv');
  expect(up2.status).toBe(201);
  denseId = up2.body.results[0].curve_id;

  const noArea = await tester.post('/api/batches').send({ name: 'Cell without area' });
  const up3 = await tester.post(`/api/batches/${noArea.body.id}/curves`).field('temp_c', '33').attach('files', Buffer.from(cellCsv), 'cell-57mm.csv');
  expect(up3.status).toBe(201);
  cellId = up3.body.results[0].curve_id;
});
afterAll(async () => {
  await h.close();
});

describe('who may use the physics API', () => {
  it.each(['admin', 'test_engineer', 'designer', 'qa_lead'] as const)('%s may (every role has physics:use)', async (role) => {
    const res = await agents[role].get('/api/physics/material?temp_k=300');
    expect(res.status).toBe(200);
    expect((await agents[role].get(`/api/physics/curves/${moduleId}`)).status).toBe(200);
  });

  it('without a session: 401 with the one error shape', async () => {
    const res = await request(h.app).get('/api/physics/material?temp_k=300');
    expect(res.status).toBe(401);
    expect(res.body).toEqual(expect.objectContaining({ code: 'unauthenticated', message: expect.any(String) }));
    expect((await request(h.app).post('/api/physics/band-diagram').send({ type: 'p', doping_cm3: 1e16, excess_cm3: 0, temp_k: 300 })).status).toBe(401);
  });

  it('another organisation’s curve is 404 (not 403), for reading and translating', async () => {
    const read = await outsider.get(`/api/physics/curves/${moduleId}`);
    expect(read.status).toBe(404);
    expect(read.body.code).toBe('not_found');
    const tr = await outsider.post(`/api/physics/curves/${moduleId}/translate`).send({ method: 'model', to: { irradiance_w_m2: 1000, temp_c: 25 } });
    expect(tr.status).toBe(404);
    expect((await agents.designer.get('/api/physics/curves/no-such-curve')).status).toBe(404);
  });
});

describe('GET /api/physics/material', () => {
  it('n_i(300 K) is 9.65×10⁹ cm⁻³ within 2 % (Altermatt et al. 2003), in the keys of `ni --json`', async () => {
    const res = await agents.designer.get('/api/physics/material?temp_k=300');
    expect(res.status).toBe(200);
    const b = res.body;
    expect(Object.keys(b)).toEqual(expect.arrayContaining(['ni_cm3', 'eg_ev', 'nc_cm3', 'nv_cm3']));
    expect(rel(b.ni_cm3, 9.65e9)).toBeLessThan(0.02);
    // Green (1990), J. Appl. Phys. 67:2944: Nc(300 K) = 2.86e19, Nv(300 K) = 3.10e19 cm⁻³ (the library's source).
    expect(rel(b.nc_cm3, 2.86e19)).toBeLessThan(1e-9);
    expect(rel(b.nv_cm3, 3.1e19)).toBeLessThan(1e-9);
    // Silicon's gap at 300 K is 1.124 eV (Green 1990; Pässler 2002 gives the same to 1 meV) (memory).
    expect(Math.abs(b.eg_ev - 1.124)).toBeLessThan(0.002);
    expect(b.reference).toEqual(expect.objectContaining({ temp_k: 300, ni_cm3: 9.65e9 }));
    expect(b.reference.source).toMatch(/Altermatt/);
  });

  it('gives n_i over 200–400 K for the chart, rising steeply with temperature', async () => {
    const b = (await agents.designer.get('/api/physics/material?temp_k=320')).body;
    expect(b.series.temp_k[0]).toBe(200);
    expect(b.series.temp_k[b.series.temp_k.length - 1]).toBe(400);
    expect(b.series.temp_k).toHaveLength(41);
    for (let k = 1; k < b.series.ni_cm3.length; k++) expect(b.series.ni_cm3[k]).toBeGreaterThan(b.series.ni_cm3[k - 1]);
    // Misiakos & Tsamakis (1993) fit n_i = 5.29e19·(T/300)^2.54·exp(−6726/T) cm⁻³ (memory; the
    // library's header says its model follows these measurements to < 1 % over 250–340 K).
    const mt = (t: number) => 5.29e19 * (t / 300) ** 2.54 * Math.exp(-6726 / t);
    expect(rel(b.ni_cm3, mt(320))).toBeLessThan(0.01);
    const k250 = b.series.temp_k.indexOf(250);
    expect(rel(b.series.ni_cm3[k250], mt(250))).toBeLessThan(0.01);
  });

  it.each([
    ['abc', /^Temperature \(K\) must be a number\.$/],
    ['900', /temp_k = 900 K is outside/],
    ['-5', /temp_k/],
  ])('temp_k=%s → 400 naming temp_k', async (t, msg) => {
    const res = await agents.designer.get(`/api/physics/material?temp_k=${t}`);
    expect(res.status).toBe(400);
    expect(res.body.code).toBe('invalid_input');
    expect(res.body.message).toMatch(msg);
  });

  it('the n_i range: its own from_k and to_k, and "from" above "to" is refused at to_k in words', async () => {
    const ok = await agents.designer.get('/api/physics/material?temp_k=300&from_k=250&to_k=350');
    expect(ok.status).toBe(200);
    expect(ok.body.series.temp_k[0]).toBe(250);
    expect(ok.body.series.temp_k[ok.body.series.temp_k.length - 1]).toBe(350);
    const upside = await agents.designer.get('/api/physics/material?temp_k=300&from_k=350&to_k=250');
    expect(upside.status).toBe(400);
    expect(upside.body.message).toBe('To (K) must be above From (350 K).');
    expect(upside.body.details[0].path).toEqual(['to_k']);
    const outside = await agents.designer.get('/api/physics/material?temp_k=300&from_k=100&to_k=250');
    expect(outside.status).toBe(400);
    expect(outside.body.details).toEqual({ input: 'from_k' });
  });
});

describe('POST /api/physics/band-diagram', () => {
  it('p-type 10¹⁶ cm⁻³ with Δn = 10¹⁵ cm⁻³ at 300 K: levels and splitting agree with the Boltzmann relations by hand', async () => {
    const res = await agents.designer.post('/api/physics/band-diagram').send({ type: 'p', doping_cm3: 1e16, excess_cm3: 1e15, temp_k: 300 });
    expect(res.status).toBe(200);
    const b = res.body;
    const kT = (KB * 300) / Q;
    const ni = b.material.ni_cm3;
    // Boltzmann by hand (DOMAIN.md): p0 ≈ N_A, n0 = n_i²/N_A; E_F = −kT·ln(p0/n_i);
    // splitting = kT·ln((n0 + Δn)(p0 + Δn)/n_i²).
    const p0 = 1e16;
    const n0 = (ni * ni) / p0;
    expect(b.boltzmann.ef_ev).toBeCloseTo(-kT * Math.log(p0 / ni), 6);
    const split = kT * Math.log(((n0 + 1e15) * (p0 + 1e15)) / (ni * ni));
    expect(b.boltzmann.splitting_ev).toBeCloseTo(split, 6);
    expect(b.boltzmann.implied_voc_v).toBeCloseTo(split, 6);
    // Non-degenerate: Fermi–Dirac within 0.1 mV of Boltzmann, and the difference reported is theirs.
    expect(b.degenerate).toBe(false);
    expect(Math.abs(b.fermi_dirac.splitting_ev - split)).toBeLessThan(1e-4);
    expect(b.difference.splitting_ev).toBeCloseTo(b.boltzmann.splitting_ev - b.fermi_dirac.splitting_ev, 12);
    // Band diagram: six levels, ordered Ec > E_Fn > E_i > E_F = E_Fp... > Ev for a p-type sample under light.
    const lv = Object.fromEntries(b.diagram.levels.map((l: { key: string; energy_ev: number }) => [l.key, l.energy_ev]));
    expect(Object.keys(lv).sort()).toEqual(['EF', 'EFn', 'EFp', 'Ec', 'Ei', 'Ev']);
    expect(lv.Ec).toBeGreaterThan(lv.EFn);
    expect(lv.EFn).toBeGreaterThan(0);
    expect(lv.EFp).toBeLessThan(lv.Ei);
    expect(lv.Ev).toBeLessThan(lv.EFp);
    expect(lv.Ec - lv.Ev).toBeCloseTo(b.material.eg_dos_ev, 9);
    expect(b.diagram.splitting_ev).toBeCloseTo(lv.EFn - lv.EFp, 12);
    // Occupation curves: probabilities, one per energy.
    expect(b.occupation.energy_ev).toHaveLength(121);
    for (const key of ['occupation_equilibrium', 'occupation_electrons', 'occupation_holes']) {
      expect(b.occupation[key]).toHaveLength(121);
      for (const f of b.occupation[key]) expect(f >= 0 && f <= 1).toBe(true);
    }
  });

  it('a generation rate with a lifetime is the same injection as Δn = G·τ (10²⁰ cm⁻³s⁻¹ × 10 µs = 10¹⁵ cm⁻³)', async () => {
    const a = (await agents.designer.post('/api/physics/band-diagram').send({ type: 'p', doping_cm3: 1e16, excess_cm3: 1e15, temp_k: 300 })).body;
    const g = await agents.designer.post('/api/physics/band-diagram').send({ type: 'p', doping_cm3: '1e16', generation_cm3_s: 1e20, lifetime_s: 1e-5, temp_k: '300' });
    expect(g.status).toBe(200);
    expect(g.body.input.excess_cm3).toBeCloseTo(1e15, -3);
    expect(g.body.fermi_dirac.splitting_ev).toBeCloseTo(a.fermi_dirac.splitting_ev, 9);
  });

  it('degenerate n-type 10²⁰ cm⁻³: flagged, and Boltzmann is off by more than 10 mV (Fermi–Dirac statistics, DOMAIN.md)', async () => {
    const b = (await agents.designer.post('/api/physics/band-diagram').send({ type: 'n', doping_cm3: 1e20, excess_cm3: 1e15, temp_k: 300 })).body;
    expect(b.degenerate).toBe(true);
    expect(Math.abs(b.difference.splitting_ev)).toBeGreaterThan(0.01);
    // The Fermi level lies in the conduction band: η_n > 0.
    expect(b.fermi_dirac.eta_n).toBeGreaterThan(0);
  });

  it('more doping of a lightly injected p-type sample raises the splitting (minority density fixed, majority up)', async () => {
    const at = async (doping: number) => (await agents.designer.post('/api/physics/band-diagram').send({ type: 'p', doping_cm3: doping, excess_cm3: 1e14, temp_k: 300 })).body.fermi_dirac.splitting_ev as number;
    const low = await at(1e15);
    const high = await at(1e17);
    // By hand (Boltzmann): splitting ≈ kT·ln(Δn·N_A/n_i²), so ×100 in N_A adds kT·ln(100) = 0.1191 V at 300 K.
    expect(high - low).toBeCloseTo(((KB * 300) / Q) * Math.log(100), 2);
  });

  it.each([
    [{ type: 'x', doping_cm3: 1e16, excess_cm3: 0, temp_k: 300 }, /type/],
    [{ type: 'p', doping_cm3: -1, excess_cm3: 0, temp_k: 300 }, /doping_cm3/],
    [{ type: 'p', doping_cm3: 1e22, excess_cm3: 0, temp_k: 300 }, /doping_cm3/],
    // A malformed number is said in the form's words; which input it is stays in details.
    [{ type: 'p', doping_cm3: 'lots', excess_cm3: 0, temp_k: 300 }, /^Doping density \(cm⁻³\) must be a number\.$/],
    [{ type: 'p', doping_cm3: 1e16, excess_cm3: 1e15, generation_cm3_s: 1e20, lifetime_s: 1e-5, temp_k: 300 }, /excess_cm3/],
    [{ type: 'p', doping_cm3: 1e16, generation_cm3_s: 1e20, temp_k: 300 }, /lifetime_s/],
    [{ type: 'p', doping_cm3: 1e16, excess_cm3: 0 }, /^Temperature \(K\) is required\.$/],
    [{ type: 'p', doping_cm3: 1e16, excess_cm3: 0, temp_k: 40 }, /temp_k/],
    [{ type: 'p', doping_cm3: 1e16, excess_cm3: -3, temp_k: 300 }, /excess_cm3/],
  ])('%j → 400 naming the input', async (body, name) => {
    const res = await agents.designer.post('/api/physics/band-diagram').send(body);
    expect(res.status).toBe(400);
    expect(res.body.code).toBe('invalid_input');
    expect(res.body.message).toMatch(name);
  });
});

describe('GET /api/physics/curves/:id', () => {
  type Physics = {
    conditions: { temp_c: number; cells: number; cell_area_cm2: number | null };
    curve: { metrics: { isc_a: number; voc_v: number } };
    single: {
      params: { iph_a: number; i0_a: number; n: number };
      j0_a_cm2: number | null;
      implied_voc: { voc_v: number; measured_voc_v: number };
      coefficient: { beta_v_per_k: number; beta_pct_per_k: number; law: string; voc_v: number };
      coefficient_de_soto: { beta_pct_per_k: number; law: string };
      voc_vs_temperature: { law: string; points: { temp_c: number; voc_v: number }[] };
    };
    double: { j01_a_cm2: number; shares: { depletion_share: number; diffusion_share: number } | null } | null;
    stc: { pmp_w: number } | null;
    notes: string[];
  };
  let m: Physics;
  beforeAll(async () => {
    const res = await agents.designer.get(`/api/physics/curves/${moduleId}`);
    expect(res.status).toBe(200);
    m = res.body;
  });

  it('J0 = I0 per cell area: 3600 cm²/36 cells = 100 cm² (definition, by hand)', () => {
    expect(m.conditions).toEqual(expect.objectContaining({ temp_c: 45, cells: 36, cell_area_cm2: 100 }));
    expect(rel(m.single.j0_a_cm2 as number, m.single.params.i0_a / 100)).toBeLessThan(1e-12);
    // The fitted I0 is the README's true-current optimum 2.6381e-6 A within 5 % (reference data README).
    expect(rel(m.single.params.i0_a, 2.6381e-6)).toBeLessThan(0.05);
    expect(m.double).not.toBeNull();
    if (m.double?.shares) expect(m.double.shares.depletion_share + m.double.shares.diffusion_share).toBeCloseTo(1, 12);
  });

  it('the module’s Voc coefficient lies in −0.6…−0.3 %/K (lib/physics tests: its 0.47 V cells are steeper than the common −0.3 %/K)', () => {
    expect(m.single.coefficient.law).toBe('ni-power');
    expect(m.single.coefficient.beta_pct_per_k).toBeGreaterThan(-0.6);
    expect(m.single.coefficient.beta_pct_per_k).toBeLessThan(-0.3);
    expect(m.single.coefficient.beta_pct_per_k).toBeCloseTo((100 * m.single.coefficient.beta_v_per_k) / m.single.coefficient.voc_v, 9);
    // The De Soto law has no 1/n in its exponent, so for n > 1 it is steeper (library header).
    expect(m.single.coefficient_de_soto.law).toBe('desoto');
    expect(m.single.coefficient_de_soto.beta_pct_per_k).toBeLessThan(m.single.coefficient.beta_pct_per_k);
  });

  it('predicts Voc over −40…+85 °C in 5 K steps, falling, through the fitted Voc at 45 °C', () => {
    const pts = m.single.voc_vs_temperature.points;
    expect(pts[0].temp_c).toBe(-40);
    expect(pts[pts.length - 1].temp_c).toBe(85);
    expect(pts).toHaveLength(26);
    for (let k = 1; k < pts.length; k++) expect(pts[k].voc_v).toBeLessThan(pts[k - 1].voc_v);
    const at45 = pts.find((p) => p.temp_c === 45)!;
    expect(rel(at45.voc_v, m.single.coefficient.voc_v)).toBeLessThan(1e-9);
    // The fit reproduces the measured Voc within 1 % (its RMSE is 2 mA on a 1 A curve).
    expect(rel(at45.voc_v, m.curve.metrics.voc_v)).toBeLessThan(0.01);
  });

  it('the Voc chart takes its own range (from_c, to_c); "from" above "to" or an end outside the model is refused, naming it', async () => {
    const res = await agents.designer.get(`/api/physics/curves/${moduleId}?from_c=0&to_c=50`);
    expect(res.status).toBe(200);
    const pts = (res.body as Physics).single.voc_vs_temperature.points;
    expect(pts[0].temp_c).toBe(0);
    expect(pts[pts.length - 1].temp_c).toBe(50);
    const upside = await agents.designer.get(`/api/physics/curves/${moduleId}?from_c=60&to_c=10`);
    expect(upside.status).toBe(400);
    expect(upside.body.message).toBe('To (°C) must be above From (60 °C).');
    // 500 K is the model's top, 226.85 °C (0 °C = 273.15 K).
    const outside = await agents.designer.get(`/api/physics/curves/${moduleId}?from_c=0&to_c=300`);
    expect(outside.status).toBe(400);
    expect(outside.body.details).toEqual({ input: 'to_c' });
    expect(outside.body.message).toMatch(/to_c = 300 °C is outside .* −123\.15…226\.85 °C/);
  });

  it('implied Voc = n·Ns·Vt·ln(Isc/I0 + 1), computed by hand here, close to the measured Voc', () => {
    const { n, i0_a } = m.single.params;
    const byHand = n * 36 * vt(45) * Math.log(m.curve.metrics.isc_a / i0_a + 1);
    expect(m.single.implied_voc.voc_v).toBeCloseTo(byHand, 9);
    // Rsh takes a little current at Voc, so the implied Voc is at or above the measured one, within 2 %.
    expect(rel(m.single.implied_voc.voc_v, m.curve.metrics.voc_v)).toBeLessThan(0.02);
  });

  it('returns the stored STC figures unchanged', async () => {
    const c = (await agents.designer.get(`/api/curves/${moduleId}`)).body;
    expect(m.stc).toEqual(c.stc);
    expect((m.stc as unknown as { method: string }).method).toBe('model');
    expect((m.stc as { pmp_w: number }).pmp_w).toBeGreaterThan(0);
  });

  it('a curve without a device area: J0 is null and the notes say why; the implied Voc still comes (area cancels)', async () => {
    const res = await agents.designer.get(`/api/physics/curves/${cellId}`);
    expect(res.status).toBe(200);
    expect(res.body.conditions.cell_area_cm2).toBeNull();
    expect(res.body.single.j0_a_cm2).toBeNull();
    expect(res.body.notes.join(' ')).toMatch(/no device area/);
    expect(res.body.single.implied_voc.voc_v).toBeGreaterThan(0.5);
  });
});

describe('POST /api/physics/curves/:id/translate', () => {
  const translate = (id: string, body: Record<string, unknown>) => agents.designer.post(`/api/physics/curves/${id}/translate`).send(body);

  it('model method: the 45 °C module delivers more at 25 °C than at 45 °C (silicon loses power with heat)', async () => {
    const at25 = await translate(moduleId, { method: 'model', to: { irradiance_w_m2: 1000, temp_c: 25 }, i0_law: 'ni-power' });
    const at45 = await translate(moduleId, { method: 'model', to: { irradiance_w_m2: 1000, temp_c: 45 }, i0_law: 'ni-power' });
    expect(at25.status).toBe(200);
    expect(at25.body.figures_source).toBe('model');
    expect(at25.body.figures.pmp_w).toBeGreaterThan(at45.body.figures.pmp_w);
    // To its own conditions the model gives back the measured Pmax within 2 % (a fit, not the data).
    expect(rel(at45.body.figures.pmp_w, at45.body.measured.figures.pmp_w)).toBeLessThan(0.02);
    // Same as the stored STC figures, which use the same scaling with the n_i law (lib/analysis/stc.ts).
    const c = (await agents.designer.get(`/api/curves/${moduleId}`)).body;
    expect(rel(at25.body.figures.pmp_w, c.stc.pmp_w)).toBeLessThan(1e-6);
    expect(at25.body.curve.voltage_v.length).toBeLessThanOrEqual(200);
    expect(at25.body.curve.voltage_v).toHaveLength(at25.body.curve.current_a.length);
  });

  it('IEC 60891 procedure 1 to the curve’s own conditions leaves it unchanged (ΔT = 0, G2/G1 = 1, by hand)', async () => {
    const res = await translate(moduleId, { method: 'iec60891-1', to: { irradiance_w_m2: 1000, temp_c: 45 }, alpha_a_per_k: 0.0005, beta_v_per_k: -0.08, rs_ohm: 1.2, kappa_ohm_per_k: 0 });
    expect(res.status).toBe(200);
    expect(res.body.figures.voc_v).toBeCloseTo(res.body.measured.figures.voc_v, 9);
    expect(res.body.figures.pmp_w).toBeCloseTo(res.body.measured.figures.pmp_w, 9);
  });

  it('IEC 60891 procedure 1 to 25 °C with β from the model: Voc rises by β·ΔT at I = 0, by hand', async () => {
    const phys = (await agents.designer.get(`/api/physics/curves/${moduleId}`)).body;
    const beta = phys.single.coefficient.beta_v_per_k;
    const res = await translate(moduleId, { method: 'iec60891-1', to: { irradiance_w_m2: 1000, temp_c: 25 }, alpha_a_per_k: 0.0005 * 1.03, beta_v_per_k: beta, rs_ohm: 1.2, kappa_ohm_per_k: 0 });
    expect(res.status).toBe(200);
    // By hand from the procedure's equations: I2 = I1 + α·ΔT, so the new Voc (I2 = 0) comes from the
    // measured point with I1 = −α·ΔT = 0.0103 A, which sits Rs0·I1 below Voc1 (Rs0 = −dV/dI at Voc,
    // the curve's own slope); V2 = V1 − Rs·(I2 − I1) + β·ΔT. Curvature over those 10 mA: < 3 mV.
    const i1 = -0.0005 * 1.03 * -20;
    const m = res.body.measured.figures;
    const expected = m.voc_v - m.rs0_ohm * i1 + 1.2 * i1 + beta * -20;
    expect(Math.abs(res.body.figures.voc_v - expected)).toBeLessThan(0.003);
    expect(res.body.figures.pmp_w).toBeGreaterThan(res.body.measured.figures.pmp_w);
  });

  it('thins a dense curve to at most 200 points and says how many there were', async () => {
    const res = await translate(denseId, { method: 'iec60891-2', to: { irradiance_w_m2: 800, temp_c: 25 }, alpha_rel_per_k: 0.0005, beta_rel_per_k: -0.004, rs_ohm: 1.2, kappa_ohm_per_k: 0, a_irradiance: 0.06 });
    expect(res.status).toBe(200);
    expect(res.body.points_total).toBeGreaterThanOrEqual(401);
    expect(res.body.curve.voltage_v).toHaveLength(200);
    expect(res.body.measured.curve.voltage_v).toHaveLength(200);
    // Procedure 2 scales the current with G2/G1 (by hand): Isc 0.8 × (1 − 0.0005·20) of the measured.
    expect(rel(res.body.figures.isc_a, res.body.measured.figures.isc_a * 0.8 * (1 - 0.0005 * 20))).toBeLessThan(0.005);
  });

  it('missing coefficients → 400 naming every one of them', async () => {
    const res = await translate(moduleId, { method: 'iec60891-1', to: { irradiance_w_m2: 1000, temp_c: 25 } });
    expect(res.status).toBe(400);
    expect(res.body.code).toBe('invalid_input');
    // Each named by its label and unit in the message, by its key in details.
    const paths = (body: { details: { path: string[] }[] }) => body.details.map((d) => d.path.join('.'));
    expect(paths(res.body)).toEqual(['alpha_a_per_k', 'beta_v_per_k', 'rs_ohm', 'kappa_ohm_per_k']);
    for (const k of ['alpha_a_per_k', 'beta_v_per_k', 'rs_ohm', 'kappa_ohm_per_k'] as const) expect(res.body.message).toContain(coefficientLabel(k));
    const two = await translate(moduleId, { method: 'iec60891-2', to: { irradiance_w_m2: 1000, temp_c: 25 }, alpha_rel_per_k: 0.0005, beta_rel_per_k: -0.004, rs_ohm: 1 });
    expect(two.status).toBe(400);
    expect(paths(two.body)).toEqual(['kappa_ohm_per_k', 'a_irradiance']);
    expect(two.body.message).toContain(coefficientLabel('kappa_ohm_per_k'));
    expect(two.body.message).toContain(coefficientLabel('a_irradiance'));
  });

  it.each([
    [{ method: 'sideways', to: { irradiance_w_m2: 1000, temp_c: 25 } }, /method/],
    [{ method: 'model' }, /^Give the target irradiance \(W\/m²\) and cell temperature \(°C\)\.$/],
    [{ method: 'model', to: { irradiance_w_m2: 1000, temp_c: 500 } }, /to\.temp_c/],
    [{ method: 'model', to: { irradiance_w_m2: -5, temp_c: 25 } }, /to\.irradiance_w_m2/],
    [{ method: 'model', to: { irradiance_w_m2: 1000, temp_c: 'warm' } }, /^Target cell temperature \(°C\) must be a number\.$/],
  ])('%j → 400 naming the input', async (body, name) => {
    const res = await translate(moduleId, body);
    expect(res.status).toBe(400);
    expect(res.body.message).toMatch(name);
  });
});
