import { KB_EV_PER_K } from '@/lib/physics/constants';
import { PhysicsError } from '@/lib/physics/errors';
import { intrinsicDensity_cm3, materialAt, materialFromParameters, SILICON } from '@/lib/physics/materials';

const rel = (a: number, b: number) => Math.abs(a / b - 1);

/**
 * Misiakos & Tsamakis (1993), J. Appl. Phys. 74:3293, fit to their capacitance measurements
 * (78–340 K): n_i = 5.29e19·(T/300)^2.54·exp(−6726/T) cm⁻³. Written from memory; the
 * recollection checks out: at 300 K it gives 9.66e9 cm⁻³, their quoted ≈ 9.7e9 and within
 * 0.1 % of Altermatt et al. (2003).
 */
const misiakosTsamakis = (temp_k: number) => 5.29e19 * (temp_k / 300) ** 2.54 * Math.exp(-6726 / temp_k);

describe('silicon intrinsic carrier density n_i(T)', () => {
  it('n_i(300 K) = 9.65e9 cm⁻³ within 2 % (Altermatt et al. 2003, J. Appl. Phys. 93:1598)', () => {
    // Measured: 9.685e9 cm⁻³, +0.4 %.
    expect(rel(intrinsicDensity_cm3(300), 9.65e9)).toBeLessThan(0.02);
  });

  it('the Misiakos–Tsamakis fit itself gives ≈ 9.7e9 at 300 K (checks the memory of the formula)', () => {
    expect(rel(misiakosTsamakis(300), 9.7e9)).toBeLessThan(0.01);
  });

  // Tolerance 1 % over 250–340 K, the range (measured worst 0.7 %); 3 % further down to
  // 200 K, still inside their measured range (measured 2.3 % at 200 K).
  it.each([250, 260, 270, 280, 290, 300, 310, 320, 330, 340])(
    'n_i(%f K) follows Misiakos & Tsamakis (1993) within 1 %',
    (temp_k) => {
      expect(rel(intrinsicDensity_cm3(temp_k), misiakosTsamakis(temp_k))).toBeLessThan(0.01);
    },
  );

  it.each([200, 220, 240])('n_i(%f K) follows Misiakos & Tsamakis (1993) within 3 %', (temp_k) => {
    expect(rel(intrinsicDensity_cm3(temp_k), misiakosTsamakis(temp_k))).toBeLessThan(0.03);
  });

  it('is plausible from 200 to 400 K: rises monotonically, and at 400 K stays within 5 % of the Misiakos–Tsamakis fit extrapolated past its 340 K limit (plausibility only)', () => {
    let previous = 0;
    for (let t = 200; t <= 400; t += 5) {
      const ni = intrinsicDensity_cm3(t);
      expect(ni).toBeGreaterThan(previous);
      previous = ni;
    }
    expect(rel(intrinsicDensity_cm3(400), misiakosTsamakis(400))).toBeLessThan(0.05);
  });
});

describe('silicon band gap Eg(T) (Pässler 2002 model)', () => {
  // Varshni form with Thurmond (1975, J. Electrochem. Soc. 122:1133) parameters:
  // Eg = 1.17 − 4.73e-4·T²/(T + 636) eV (memory; the same form as in DOMAIN.md).
  const thurmond = (t: number) => 1.17 - (4.73e-4 * t * t) / (t + 636);
  it.each([200, 250, 300, 350, 400])('Eg(%f K) is within 2 meV of Varshni/Thurmond (1975)', (temp_k) => {
    expect(Math.abs(materialAt(temp_k).eg_ev - thurmond(temp_k))).toBeLessThan(0.002);
  });

  // Green (1990), J. Appl. Phys. 67:2944, after Bludau et al. (1974): Eg(300 K) = 1.1242 eV (memory).
  it('Eg(300 K) = 1.1242 eV within 1 meV (Green 1990, memory)', () => {
    expect(Math.abs(materialAt(300).eg_ev - 1.1242)).toBeLessThan(0.001);
  });

  it('the statistics gap k_BT·ln(Nc·Nv/n_i²) sits a few meV above the band gap (band-gap-narrowing correction in n_i)', () => {
    for (const t of [200, 300, 400]) {
      const s = materialAt(t);
      expect(s.eg_dos_ev - s.eg_ev).toBeGreaterThan(0);
      expect(s.eg_dos_ev - s.eg_ev).toBeLessThan(0.01);
      expect(s.kt_ev).toBeCloseTo(KB_EV_PER_K * t, 15);
    }
  });
});

describe('effective densities of states (Green 1990)', () => {
  // Green (1990): Nc(300 K) = 2.86e19, Nv(300 K) = 3.10e19 cm⁻³ (memory).
  it('Nc(300 K) = 2.86e19 and Nv(300 K) = 3.10e19 cm⁻³ (Green 1990, memory)', () => {
    const s = materialAt(300);
    expect(rel(s.nc_cm3, 2.86e19)).toBeLessThan(1e-12);
    expect(rel(s.nv_cm3, 3.1e19)).toBeLessThan(1e-12);
  });

  it('grow with temperature faster than T^1.5 (temperature-dependent effective masses, Green 1990)', () => {
    const a = materialAt(250);
    const b = materialAt(350);
    expect(b.nc_cm3 / a.nc_cm3).toBeGreaterThan((350 / 250) ** 1.5);
    expect(b.nv_cm3 / a.nv_cm3).toBeGreaterThan((350 / 250) ** 1.5);
  });
});

describe('bad temperatures', () => {
  it.each([[0], [-5], [Number.NaN], [1e6], [100], [501]])('temp_k = %f is rejected naming temp_k', (temp_k) => {
    expect(() => materialAt(temp_k)).toThrow(PhysicsError);
    expect(() => materialAt(temp_k)).toThrow(/temp_k/);
  });
});

describe('another material from a parameter set', () => {
  // GaAs (memory; e.g. Blakemore 1982, J. Appl. Phys. 53:R123): Varshni 1.519 eV, 5.405e-4 eV/K,
  // 204 K; Nc(300) = 4.7e17, Nv(300) = 9.0e18 cm⁻³, both ∝ T^1.5; tabulated n_i(300 K) ≈ 2.1e6 cm⁻³.
  const gaas = materialFromParameters({
    id: 'gaas',
    name: 'gallium arsenide',
    eg0_ev: 1.519,
    alpha_ev_per_k: 5.405e-4,
    beta_k: 204,
    nc300_cm3: 4.7e17,
    ncExponent: 1.5,
    nv300_cm3: 9.0e18,
    nvExponent: 1.5,
    temp_range_k: { min: 200, max: 500 },
    max_doping_cm3: 1e20,
    source: 'test parameter set (memory)',
  });

  it('gives n_i(300 K) within 20 % of the tabulated 2.1e6 cm⁻³ (memory)', () => {
    // Measured 2.3e6; the tolerance reflects the spread of tabulated GaAs parameters.
    expect(rel(materialAt(300, gaas).ni_cm3, 2.1e6)).toBeLessThan(0.2);
  });

  it('is self-consistent: the statistics gap equals its band gap', () => {
    const s = materialAt(300, gaas);
    expect(s.eg_dos_ev).toBeCloseTo(s.eg_ev, 12);
    expect(SILICON.id).not.toBe(gaas.id);
  });

  it('rejects a parameter set with a non-positive density, naming it', () => {
    expect(() => materialFromParameters({ ...gaasParams(), nc300_cm3: -1 })).toThrow(/nc300_cm3/);
  });
});

function gaasParams() {
  return {
    id: 'x',
    name: 'x',
    eg0_ev: 1.5,
    alpha_ev_per_k: 5e-4,
    beta_k: 200,
    nc300_cm3: 1e18,
    ncExponent: 1.5,
    nv300_cm3: 1e19,
    nvExponent: 1.5,
    temp_range_k: { min: 200, max: 500 },
    max_doping_cm3: 1e20,
    source: 'x',
  };
}
