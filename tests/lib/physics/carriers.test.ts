import fc from 'fast-check';
import {
  bandDiagram,
  bandEdges,
  carrierDensities,
  equilibrium,
  occupationCurve,
  quasiFermiLevels,
} from '@/lib/physics/carriers';
import { PhysicsError } from '@/lib/physics/errors';
import { materialAt } from '@/lib/physics/materials';
import { referenceFermiIntegral } from './fd-reference';

const rel = (a: number, b: number) => Math.abs(a / b - 1);
/** Degeneracy factor γ = F½(η)/e^η from the test's own quadrature (independent of the library). */
const gamma = (eta: number) => (eta < -40 ? 1 : referenceFermiIntegral(0.5, eta) / Math.exp(eta));

describe('band edges and carrier densities', () => {
  it('Ec − Ev equals the statistics gap and Ei sits where n = p = n_i (definition)', () => {
    const e = bandEdges(300);
    const s = materialAt(300);
    expect(e.ec_ev - e.ev_ev).toBeCloseTo(s.eg_dos_ev, 12);
    const d = carrierDensities(0, 300);
    // At E_i both carriers are non-degenerate (η ≈ −22), so Boltzmann is exact to ~1e-10.
    expect(rel(d.n_cm3, s.ni_cm3)).toBeLessThan(1e-9);
    expect(rel(d.p_cm3, s.ni_cm3)).toBeLessThan(1e-9);
  });

  it('n = Nc·F½(η_n) matches the independent quadrature, and the Boltzmann error is shown', () => {
    const e = bandEdges(300);
    const s = materialAt(300);
    const ef = e.ec_ev + 3 * s.kt_ev; // η_n = 3: degenerate electrons
    const d = carrierDensities(ef, 300);
    expect(d.eta_n).toBeCloseTo(3, 12);
    expect(rel(d.n_cm3, s.nc_cm3 * referenceFermiIntegral(0.5, 3))).toBeLessThan(1e-9);
    expect(d.boltzmann_error_n).toBeGreaterThan(3); // e^3/F½(3) − 1 ≈ 3.5
  });

  it('rejects a Fermi level deeper than 100·kT inside a band, naming it', () => {
    expect(() => carrierDensities(10, 300)).toThrow(/fermi_level_ev/);
  });
});

describe('equilibrium Fermi level from charge neutrality', () => {
  it('intrinsic material: E_F ≈ E_i and n0 = p0 = n_i (definition of n_i)', () => {
    const eq = equilibrium({ type: 'n', doping_cm3: 0, temp_k: 300 });
    expect(Math.abs(eq.ef_ev)).toBeLessThan(1e-9);
    expect(rel(eq.n0_cm3, eq.material.ni_cm3)).toBeLessThan(1e-9);
  });

  // Non-degenerate p-type 1e16 cm⁻³: p0 = N_A; mass-action law with Fermi–Dirac holes,
  // n0·p0 = n_i²·γ(η_p) (DOMAIN.md), γ from the test's quadrature; Boltzmann E_F = −kT·ln(N_A/n_i).
  it('p-type 1e16 cm⁻³ at 300 K: p0 = N_A, n0·p0 = n_i²·γ_p, E_F at the Boltzmann position within 1e-5 eV', () => {
    const eq = equilibrium({ type: 'p', doping_cm3: 1e16, temp_k: 300 });
    const s = eq.material;
    const eta_p = (eq.edges.ev_ev - eq.ef_ev) / s.kt_ev;
    expect(rel(eq.p0_cm3, 1e16)).toBeLessThan(1e-9);
    expect(rel(eq.n0_cm3 * eq.p0_cm3, s.ni_cm3 ** 2 * gamma(eta_p))).toBeLessThan(1e-9);
    expect(Math.abs(eq.ef_ev - -s.kt_ev * Math.log(1e16 / s.ni_cm3))).toBeLessThan(1e-5);
    expect(eq.degenerate).toBe(false);
  });

  // Degenerate n-type 1e20 cm⁻³: neutrality N_D + p0 = Nc·F½(η_n) checked with the test quadrature;
  // η_n checked against Joyce & Dixon (1977) (memory; accurate to ~5e-5 near r = 3.5).
  it('degenerate n-type 1e20 cm⁻³: neutrality holds with Fermi–Dirac electrons, E_F above the Boltzmann estimate', () => {
    const eq = equilibrium({ type: 'n', doping_cm3: 1e20, temp_k: 300 });
    const s = eq.material;
    const eta_n = (eq.ef_ev - eq.edges.ec_ev) / s.kt_ev;
    expect(rel(s.nc_cm3 * referenceFermiIntegral(0.5, eta_n), 1e20 + eq.p0_cm3)).toBeLessThan(1e-9);
    const r = 1e20 / s.nc_cm3;
    const joyceDixon = Math.log(r) + 0.353553 * r - 4.95009e-3 * r ** 2 + 1.48386e-4 * r ** 3 - 4.42563e-6 * r ** 4;
    expect(Math.abs(eta_n - joyceDixon)).toBeLessThan(2e-4);
    expect(eq.ef_ev).toBeGreaterThan(eq.boltzmann.ef_ev + 0.01);
    expect(eq.ef_ev).toBeGreaterThan(eq.edges.ec_ev); // E_F inside the conduction band
    expect(eq.degenerate).toBe(true);
  });

  it('handles the solubility limit (2e21 cm⁻³) of p-type doping without NaN', () => {
    const eq = equilibrium({ type: 'p', doping_cm3: 2e21, temp_k: 300 });
    expect(rel(eq.p0_cm3, 2e21)).toBeLessThan(1e-9);
    expect(Number.isFinite(eq.n0_cm3) && eq.n0_cm3 > 0).toBe(true);
  });
});

describe('quasi-Fermi levels under injection', () => {
  // Boltzmann closed form (DOMAIN.md): splitting = kT·ln((n0 + Δ)(p0 + Δ)/n_i²), n0 = n_i²/N_A.
  it('non-degenerate p-type 1e16, Δn = 1e15 at 300 K: splitting matches the Boltzmann closed form within 1e-5 eV', () => {
    const q = quasiFermiLevels({ type: 'p', doping_cm3: 1e16, excess_cm3: 1e15, temp_k: 300 });
    const s = q.material;
    const n0 = s.ni_cm3 ** 2 / 1e16;
    const closedForm = s.kt_ev * Math.log(((n0 + 1e15) * (1e16 + 1e15)) / s.ni_cm3 ** 2);
    expect(Math.abs(q.splitting_ev - closedForm)).toBeLessThan(1e-5);
    expect(q.implied_voc_v).toBe(q.splitting_ev);
    expect(Math.abs(q.boltzmann.splitting_ev - closedForm)).toBeLessThan(1e-12);
    // Order of the levels for p-type under low injection.
    expect(q.edges.ev_ev).toBeLessThan(q.efp_ev);
    expect(q.efp_ev).toBeLessThan(0);
    expect(q.efn_ev).toBeGreaterThan(0);
    expect(q.efn_ev).toBeLessThan(q.edges.ec_ev);
  });

  // DOMAIN.md: with Fermi–Dirac statistics n·p = n_i²·exp(ΔE_F/kT)·γ_n·γ_p.
  it('degenerate n-type 1e20, Δn = 1e17: n·p = n_i²·exp(splitting/kT)·γ_n·γ_p (γ from the test quadrature)', () => {
    const q = quasiFermiLevels({ type: 'n', doping_cm3: 1e20, excess_cm3: 1e17, temp_k: 300 });
    const s = q.material;
    const rhs = s.ni_cm3 ** 2 * Math.exp(q.splitting_ev / s.kt_ev) * gamma(q.eta_n) * gamma(q.eta_p);
    expect(rel(q.n_cm3 * q.p_cm3, rhs)).toBeLessThan(1e-8);
    // The Boltzmann answer differs visibly here: that is the point of showing it beside.
    expect(Math.abs(q.splitting_ev - q.boltzmann.splitting_ev)).toBeGreaterThan(0.01);
  });

  it('a generation rate with a lifetime gives the same result as Δn = G·τ', () => {
    const a = quasiFermiLevels({ type: 'p', doping_cm3: 1e16, generation_cm3_s: 1e19, lifetime_s: 1e-4, temp_k: 300 });
    const b = quasiFermiLevels({ type: 'p', doping_cm3: 1e16, excess_cm3: 1e15, temp_k: 300 });
    expect(a.splitting_ev).toBeCloseTo(b.splitting_ev, 12);
  });

  it('no injection gives no splitting; a hotter wafer gives less splitting at the same injection', () => {
    expect(quasiFermiLevels({ type: 'n', doping_cm3: 1e15, excess_cm3: 0, temp_k: 300 }).splitting_ev).toBe(0);
    const cold = quasiFermiLevels({ type: 'p', doping_cm3: 1e16, excess_cm3: 1e15, temp_k: 300 });
    const hot = quasiFermiLevels({ type: 'p', doping_cm3: 1e16, excess_cm3: 1e15, temp_k: 350 });
    expect(hot.splitting_ev).toBeLessThan(cold.splitting_ev);
  });

  it.each([
    [{ type: 'p', doping_cm3: -1, excess_cm3: 1e15, temp_k: 300 }, 'doping_cm3'],
    [{ type: 'p', doping_cm3: 3e21, excess_cm3: 1e15, temp_k: 300 }, 'doping_cm3'],
    [{ type: 'p', doping_cm3: 1e16, excess_cm3: -1, temp_k: 300 }, 'excess_cm3'],
    [{ type: 'p', doping_cm3: 1e16, excess_cm3: 1e15, generation_cm3_s: 1e19, lifetime_s: 1e-4, temp_k: 300 }, 'excess_cm3'],
    [{ type: 'p', doping_cm3: 1e16, generation_cm3_s: 1e19, temp_k: 300 }, 'lifetime_s'],
    [{ type: 'p', doping_cm3: 1e16, temp_k: 300 }, 'excess_cm3'],
    [{ type: 'x', doping_cm3: 1e16, excess_cm3: 1e15, temp_k: 300 }, 'type'],
    [{ type: 'p', doping_cm3: 1e16, excess_cm3: 1e15, temp_k: 0 }, 'temp_k'],
    [{ type: 'p', doping_cm3: 1e16, excess_cm3: 1e15, temp_k: 5000 }, 'temp_k'],
    [{ type: 'p', doping_cm3: 1e16, excess_cm3: 1e25, temp_k: 300 }, 'excess_cm3'],
  ])('bad input %j is rejected naming %s', (input, name) => {
    let caught: unknown;
    try {
      quasiFermiLevels(input as Parameters<typeof quasiFermiLevels>[0]);
    } catch (err) {
      caught = err;
    }
    expect(caught).toBeInstanceOf(PhysicsError);
    expect((caught as PhysicsError).input).toBe(name);
  });
});

describe('band diagram and occupation curve for a screen', () => {
  const diagram = bandDiagram({ type: 'p', doping_cm3: 1e16, excess_cm3: 1e14, temp_k: 300 });

  it('lists Ec > EFn > Ei > EF ≥ EFp > Ev for p-type under low injection', () => {
    const energies = Object.fromEntries(diagram.levels.map((l) => [l.key, l.energy_ev]));
    expect(energies.Ec).toBeGreaterThan(energies.EFn);
    expect(energies.EFn).toBeGreaterThan(energies.Ei);
    expect(energies.Ei).toBeGreaterThan(energies.EF);
    expect(energies.EF).toBeGreaterThanOrEqual(energies.EFp);
    expect(energies.EFp).toBeGreaterThan(energies.Ev);
    expect(diagram.implied_voc_v).toBeCloseTo(diagram.efn_ev - diagram.efp_ev, 14);
  });

  it('samples f(E) from below Ev to above Ec: finite, within [0, 1], electrons falling and empty-state probability rising with E', () => {
    const c = occupationCurve(diagram, { points: 101 });
    expect(c.energy_ev).toHaveLength(101);
    expect(c.energy_ev[0]).toBeLessThan(diagram.ev_ev);
    expect(c.energy_ev[100]).toBeGreaterThan(diagram.ec_ev);
    for (let k = 0; k < 101; k++) {
      for (const series of [c.occupation_equilibrium, c.occupation_electrons, c.occupation_holes]) {
        expect(Number.isFinite(series[k]) && series[k] >= 0 && series[k] <= 1).toBe(true);
      }
      if (k > 0) {
        expect(c.occupation_electrons[k]).toBeLessThanOrEqual(c.occupation_electrons[k - 1]);
        expect(c.occupation_holes[k]).toBeGreaterThanOrEqual(c.occupation_holes[k - 1]);
      }
    }
  });

  it('rejects a silly number of points', () => {
    expect(() => occupationCurve(diagram, { points: 1 })).toThrow(/points/);
  });
});

describe('no NaN or Infinity anywhere in the supported input space (property test)', () => {
  it('random type, doping 0–2e21 cm⁻³, excess 0–1e21 cm⁻³, 150–500 K give finite, ordered levels', () => {
    fc.assert(
      fc.property(
        fc.constantFrom<'n' | 'p'>('n', 'p'),
        fc.double({ min: -1, max: Math.log10(2e21), noNaN: true }),
        fc.double({ min: -1, max: 21, noNaN: true }),
        fc.double({ min: 150, max: 500, noNaN: true }),
        (type, logDoping, logExcess, temp_k) => {
          const doping_cm3 = logDoping < 0 ? 0 : Math.min(2e21, 10 ** logDoping);
          const excess_cm3 = logExcess < 0 ? 0 : 10 ** logExcess;
          const q = quasiFermiLevels({ type, doping_cm3, excess_cm3, temp_k });
          const numbers = [q.ef_ev, q.efn_ev, q.efp_ev, q.splitting_ev, q.n_cm3, q.p_cm3, q.boltzmann.splitting_ev];
          expect(numbers.every(Number.isFinite)).toBe(true);
          expect(q.efn_ev).toBeGreaterThanOrEqual(q.efp_ev - 1e-12);
        },
      ),
      { numRuns: 150, seed: 42 },
    );
  });
});
