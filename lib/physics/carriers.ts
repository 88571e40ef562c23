/**
 * Carrier densities, the equilibrium Fermi level and the quasi-Fermi levels under injection,
 * with Fermi–Dirac statistics and, beside them, the Boltzmann approximation.
 *
 * Energies are in eV measured from the intrinsic level E_i (the Boltzmann position where
 * n = p = n_i): Ec = k_BT·ln(Nc/n_i), Ev = −k_BT·ln(Nv/n_i), so Ec − Ev is the statistics gap
 * `eg_dos_ev` of the material model. Dopants are taken as fully ionised and the excess carriers
 * as quasi-neutral (Δn = Δp); band-gap narrowing is not modelled.
 */
import { KB_EV_PER_K } from '@/lib/physics/constants';
import {
  ETA_RANGE,
  fermiHalfExtended,
  fermiMinusHalfExtended,
  fermiOccupation,
  inverseFermiHalfExtended,
} from '@/lib/physics/fermi-dirac';
import { num, PhysicsError, requireFinite, requireNonNegative, requirePositive } from '@/lib/physics/errors';
import { materialAt, SILICON } from '@/lib/physics/materials';
import type { MaterialModel, MaterialState } from '@/lib/physics/materials';

export type DopingType = 'n' | 'p';

/** Band edges at one temperature, eV from E_i. */
export type BandEdges = { ec_ev: number; ev_ev: number; ei_ev: 0; eg_dos_ev: number; kt_ev: number };

/** Band edges of `material` at temp_k, eV measured from the intrinsic level. */
export function bandEdges(temp_k: number, material: MaterialModel = SILICON): BandEdges {
  return edgesOf(materialAt(temp_k, material));
}

function edgesOf(s: MaterialState): BandEdges {
  const ec_ev = s.kt_ev * Math.log(s.nc_cm3 / s.ni_cm3);
  const ev_ev = -s.kt_ev * Math.log(s.nv_cm3 / s.ni_cm3);
  return { ec_ev, ev_ev, ei_ev: 0, eg_dos_ev: ec_ev - ev_ev, kt_ev: s.kt_ev };
}

/** Electron and hole densities for a Fermi level, Fermi–Dirac and Boltzmann. */
export type CarrierDensities = {
  n_cm3: number;
  p_cm3: number;
  /** Reduced Fermi levels η_n = (E_F − Ec)/k_BT and η_p = (Ev − E_F)/k_BT. */
  eta_n: number;
  eta_p: number;
  boltzmann: { n_cm3: number; p_cm3: number };
  /** (Boltzmann − Fermi–Dirac)/Fermi–Dirac: how far the approximation is off. */
  boltzmann_error_n: number;
  boltzmann_error_p: number;
};

/** n = Nc·F½(η_n), p = Nv·F½(η_p) for a Fermi level fermi_level_ev measured from E_i. */
export function carrierDensities(
  fermi_level_ev: number,
  temp_k: number,
  material: MaterialModel = SILICON,
): CarrierDensities {
  requireFinite('fermi_level_ev', fermi_level_ev);
  const s = materialAt(temp_k, material);
  const e = edgesOf(s);
  const eta_n = (fermi_level_ev - e.ec_ev) / s.kt_ev;
  const eta_p = (e.ev_ev - fermi_level_ev) / s.kt_ev;
  if (eta_n > ETA_RANGE.max || eta_p > ETA_RANGE.max) {
    throw new PhysicsError(
      'fermi_level_ev',
      `fermi_level_ev = ${fermi_level_ev} lies more than ${ETA_RANGE.max}·k_BT inside a band (outside the supported range)`,
    );
  }
  const n_cm3 = s.nc_cm3 * fermiHalfExtended(eta_n);
  const p_cm3 = s.nv_cm3 * fermiHalfExtended(eta_p);
  const nB = s.nc_cm3 * Math.exp(eta_n);
  const pB = s.nv_cm3 * Math.exp(eta_p);
  return {
    n_cm3,
    p_cm3,
    eta_n,
    eta_p,
    boltzmann: { n_cm3: nB, p_cm3: pB },
    boltzmann_error_n: nB / n_cm3 - 1,
    boltzmann_error_p: pB / p_cm3 - 1,
  };
}

/** Doping and temperature of a piece of material. */
export type DopingInput = {
  type: DopingType;
  /** Net ionised dopant density, cm⁻³ (0 = intrinsic). */
  doping_cm3: number;
  temp_k: number;
};

function checkDoping(input: DopingInput, material: MaterialModel): void {
  if (input.type !== 'n' && input.type !== 'p') {
    throw new PhysicsError('type', `type must be "n" or "p" (got ${String(input.type)})`);
  }
  requireNonNegative('doping_cm3', input.doping_cm3);
  if (input.doping_cm3 > material.max_doping_cm3) {
    throw new PhysicsError(
      'doping_cm3',
      `doping_cm3 = ${num(input.doping_cm3)} cm⁻³ exceeds the solubility limit of dopants in ${material.name} (${material.max_doping_cm3.toExponential(1)} cm⁻³)`,
    );
  }
}

/**
 * Equilibrium Fermi level (eV from E_i) from charge neutrality n − p = N_D (n-type) or
 * p − n = N_A (p-type), Fermi–Dirac statistics. Newton on E_F inside a bisection bracket.
 */
function solveNeutrality(s: MaterialState, e: BandEdges, net_donors_cm3: number): number {
  const kT = s.kt_ev;
  // A hair inside η = 100 so that rounding at the bracket ends never leaves the supported range.
  const reach = (ETA_RANGE.max - 1e-6) * kT;
  let lo = e.ev_ev - reach;
  let hi = e.ec_ev + reach;
  // Start from the Boltzmann answer, which is exact unless the material is degenerate.
  const nB = net_donors_cm3 / 2 + Math.sqrt((net_donors_cm3 * net_donors_cm3) / 4 + s.ni_cm3 * s.ni_cm3);
  let ef = Math.min(hi, Math.max(lo, kT * Math.log(nB / s.ni_cm3)));
  for (let iter = 0; iter < 200; iter++) {
    const eta_n = (ef - e.ec_ev) / kT;
    const eta_p = (e.ev_ev - ef) / kT;
    const n = s.nc_cm3 * fermiHalfExtended(eta_n);
    const p = s.nv_cm3 * fermiHalfExtended(eta_p);
    const dn = (s.nc_cm3 / kT) * fermiMinusHalfExtended(eta_n);
    const dp = -(s.nv_cm3 / kT) * fermiMinusHalfExtended(eta_p);
    // Compare logarithms (the two sides span dozens of decades on the way in); both sides are
    // positive sums, so neither logarithm can see a zero or a cancellation.
    const left = net_donors_cm3 >= 0 ? n : n - net_donors_cm3;
    const right = net_donors_cm3 >= 0 ? p + net_donors_cm3 : p;
    const res = Math.log(left) - Math.log(right);
    if (res > 0) hi = ef;
    else lo = ef;
    const slope = dn / left - dp / right;
    let next = ef - res / slope;
    if (res === 0 || Math.abs(next - ef) < 1e-14) return next;
    if (!(next > lo && next < hi)) next = 0.5 * (lo + hi);
    ef = next;
    if (hi - lo < 1e-15) break;
  }
  return ef;
}

/** Equilibrium (dark) state of doped material. */
export type EquilibriumState = {
  temp_k: number;
  material: MaterialState;
  edges: BandEdges;
  /** Equilibrium Fermi level, eV from E_i. */
  ef_ev: number;
  n0_cm3: number;
  p0_cm3: number;
  /** Whether a band is within 2·k_BT of the Fermi level (Boltzmann off by > 4 %). */
  degenerate: boolean;
  boltzmann: { ef_ev: number; n0_cm3: number; p0_cm3: number };
};

/** Equilibrium Fermi level and carrier densities for a doping (Fermi–Dirac, Boltzmann beside it). */
export function equilibrium(input: DopingInput, material: MaterialModel = SILICON): EquilibriumState {
  checkDoping(input, material);
  const s = materialAt(input.temp_k, material);
  const edges = edgesOf(s);
  const net = input.type === 'n' ? input.doping_cm3 : -input.doping_cm3;
  const ef_ev = solveNeutrality(s, edges, net);
  const d = carrierDensities(ef_ev, input.temp_k, material);
  const half = Math.abs(net) / 2;
  const majorityB = half + Math.sqrt(half * half + s.ni_cm3 * s.ni_cm3);
  const minorityB = (s.ni_cm3 * s.ni_cm3) / majorityB;
  const n0B = input.type === 'n' ? majorityB : minorityB;
  const p0B = input.type === 'n' ? minorityB : majorityB;
  return {
    temp_k: input.temp_k,
    material: s,
    edges,
    ef_ev,
    n0_cm3: d.n_cm3,
    p0_cm3: d.p_cm3,
    degenerate: d.eta_n > -2 || d.eta_p > -2,
    boltzmann: { ef_ev: s.kt_ev * Math.log(n0B / s.ni_cm3), n0_cm3: n0B, p0_cm3: p0B },
  };
}

/** Doping plus an injection: either an excess density or a generation rate with a lifetime. */
export type InjectionInput = DopingInput & {
  /** Excess carrier density Δn = Δp, cm⁻³. */
  excess_cm3?: number;
  /** Generation rate, cm⁻³·s⁻¹ (with lifetime_s: Δn = G·τ). */
  generation_cm3_s?: number;
  /** Effective carrier lifetime, s. */
  lifetime_s?: number;
};

/** Quasi-Fermi levels under injection, eV from E_i; Boltzmann results under `boltzmann`. */
export type QuasiFermiState = EquilibriumState & {
  excess_cm3: number;
  n_cm3: number;
  p_cm3: number;
  efn_ev: number;
  efp_ev: number;
  /** E_Fn − E_Fp, eV. */
  splitting_ev: number;
  /** splitting/q, V: the most voltage the material can deliver at this injection. */
  implied_voc_v: number;
  eta_n: number;
  eta_p: number;
  boltzmann: EquilibriumState['boltzmann'] & {
    efn_ev: number;
    efp_ev: number;
    splitting_ev: number;
    implied_voc_v: number;
  };
};

function excessOf(input: InjectionInput): number {
  const hasExcess = input.excess_cm3 !== undefined;
  const hasRate = input.generation_cm3_s !== undefined || input.lifetime_s !== undefined;
  if (hasExcess && hasRate) {
    throw new PhysicsError('excess_cm3', 'give either excess_cm3 or generation_cm3_s with lifetime_s, not both');
  }
  if (hasExcess) return requireNonNegative('excess_cm3', input.excess_cm3 as number);
  if (!hasRate) throw new PhysicsError('excess_cm3', 'excess_cm3 (or generation_cm3_s with lifetime_s) is required');
  if (input.generation_cm3_s === undefined) throw new PhysicsError('generation_cm3_s', 'generation_cm3_s is required with lifetime_s');
  if (input.lifetime_s === undefined) throw new PhysicsError('lifetime_s', 'lifetime_s is required with generation_cm3_s');
  requireNonNegative('generation_cm3_s', input.generation_cm3_s);
  requirePositive('lifetime_s', input.lifetime_s);
  const excess = input.generation_cm3_s * input.lifetime_s;
  return requireFinite('generation_cm3_s', excess);
}

/**
 * Quasi-Fermi levels E_Fn, E_Fp (eV from E_i) of doped material carrying an excess density:
 * n = n0 + Δn = Nc·F½(η_n), p = p0 + Δn = Nv·F½(η_p), splitting E_Fn − E_Fp and implied Voc.
 * Fermi–Dirac throughout (degenerate doping handled); the Boltzmann result,
 * splitting = k_BT·ln(n·p/n_i²), is given beside it.
 */
export function quasiFermiLevels(input: InjectionInput, material: MaterialModel = SILICON): QuasiFermiState {
  const excess_cm3 = excessOf(input);
  const eq = equilibrium(input, material);
  const s = eq.material;
  const n_cm3 = eq.n0_cm3 + excess_cm3;
  const p_cm3 = eq.p0_cm3 + excess_cm3;
  const eta_n = inverseDensity('excess_cm3', n_cm3 / s.nc_cm3);
  const eta_p = inverseDensity('excess_cm3', p_cm3 / s.nv_cm3);
  const efn_ev = excess_cm3 === 0 ? eq.ef_ev : eq.edges.ec_ev + s.kt_ev * eta_n;
  const efp_ev = excess_cm3 === 0 ? eq.ef_ev : eq.edges.ev_ev - s.kt_ev * eta_p;
  const nB = eq.boltzmann.n0_cm3 + excess_cm3;
  const pB = eq.boltzmann.p0_cm3 + excess_cm3;
  const efnB = s.kt_ev * Math.log(nB / s.ni_cm3);
  const efpB = -s.kt_ev * Math.log(pB / s.ni_cm3);
  const splittingB = excess_cm3 === 0 ? 0 : efnB - efpB;
  const splitting_ev = efn_ev - efp_ev;
  return {
    ...eq,
    excess_cm3,
    n_cm3,
    p_cm3,
    efn_ev,
    efp_ev,
    splitting_ev,
    implied_voc_v: splitting_ev,
    eta_n,
    eta_p,
    degenerate: eq.degenerate || eta_n > -2 || eta_p > -2,
    boltzmann: {
      ...eq.boltzmann,
      efn_ev: excess_cm3 === 0 ? eq.boltzmann.ef_ev : efnB,
      efp_ev: excess_cm3 === 0 ? eq.boltzmann.ef_ev : efpB,
      splitting_ev: splittingB,
      implied_voc_v: splittingB,
    },
  };
}

function inverseDensity(input: string, ratio: number): number {
  try {
    return inverseFermiHalfExtended(ratio);
  } catch {
    throw new PhysicsError(
      input,
      `${input} puts a quasi-Fermi level more than ${ETA_RANGE.max}·k_BT inside a band (outside the supported range)`,
    );
  }
}

/** One horizontal line of a band diagram. */
export type BandLevel = { key: 'Ec' | 'Ev' | 'Ei' | 'EF' | 'EFn' | 'EFp'; energy_ev: number };

/** The energies a band diagram draws, eV from E_i, plus the splitting and implied Voc. */
export type BandDiagram = {
  temp_k: number;
  levels: BandLevel[];
  ec_ev: number;
  ev_ev: number;
  ei_ev: 0;
  ef_ev: number;
  efn_ev: number;
  efp_ev: number;
  splitting_ev: number;
  implied_voc_v: number;
  boltzmann_splitting_ev: number;
  ni_cm3: number;
  degenerate: boolean;
};

/** Band diagram of doped material under injection: Ec, Ev, Ei, E_F, E_Fn, E_Fp in eV from E_i. */
export function bandDiagram(input: InjectionInput, material: MaterialModel = SILICON): BandDiagram {
  const q = quasiFermiLevels(input, material);
  return {
    temp_k: q.temp_k,
    levels: [
      { key: 'Ec', energy_ev: q.edges.ec_ev },
      { key: 'EFn', energy_ev: q.efn_ev },
      { key: 'EF', energy_ev: q.ef_ev },
      { key: 'Ei', energy_ev: 0 },
      { key: 'EFp', energy_ev: q.efp_ev },
      { key: 'Ev', energy_ev: q.edges.ev_ev },
    ],
    ec_ev: q.edges.ec_ev,
    ev_ev: q.edges.ev_ev,
    ei_ev: 0,
    ef_ev: q.ef_ev,
    efn_ev: q.efn_ev,
    efp_ev: q.efp_ev,
    splitting_ev: q.splitting_ev,
    implied_voc_v: q.implied_voc_v,
    boltzmann_splitting_ev: q.boltzmann.splitting_ev,
    ni_cm3: q.material.ni_cm3,
    degenerate: q.degenerate,
  };
}

/** Samples of the occupation functions for a chart. */
export type OccupationCurve = {
  energy_ev: number[];
  /** f(E) with the equilibrium Fermi level. */
  occupation_equilibrium: number[];
  /** Electron occupation f(E) with E_Fn (read it near and above Ec). */
  occupation_electrons: number[];
  /** Hole occupation 1 − f(E) with E_Fp (read it near and below Ev). */
  occupation_holes: number[];
  ec_ev: number;
  ev_ev: number;
};

/**
 * f(E) sampled over [Ev − margin, Ec + margin] (eV from E_i) for a band diagram's Fermi levels:
 * equilibrium, electrons with E_Fn, holes with E_Fp. margin_eV defaults to 8·k_BT, points to 161.
 */
export function occupationCurve(
  diagram: Pick<BandDiagram, 'temp_k' | 'ec_ev' | 'ev_ev' | 'ef_ev' | 'efn_ev' | 'efp_ev'>,
  options: { points?: number; margin_eV?: number } = {},
): OccupationCurve {
  const points = options.points ?? 161;
  if (!Number.isInteger(points) || points < 2 || points > 10000) {
    throw new PhysicsError('points', `points must be an integer from 2 to 10000 (got ${points})`);
  }
  requirePositive('temp_k', diagram.temp_k);
  const margin = options.margin_eV ?? 8 * KB_EV_PER_K * diagram.temp_k;
  requirePositive('margin_eV', margin);
  const lo = diagram.ev_ev - margin;
  const hi = diagram.ec_ev + margin;
  const energy_ev: number[] = [];
  const equilibriumF: number[] = [];
  const electrons: number[] = [];
  const holes: number[] = [];
  for (let i = 0; i < points; i++) {
    const e = lo + ((hi - lo) * i) / (points - 1);
    energy_ev.push(e);
    equilibriumF.push(fermiOccupation(e, diagram.ef_ev, diagram.temp_k));
    electrons.push(fermiOccupation(e, diagram.efn_ev, diagram.temp_k));
    // 1 − f(E) = f(2·E_F − E): no cancellation deep below E_Fp.
    holes.push(fermiOccupation(2 * diagram.efp_ev - e, diagram.efp_ev, diagram.temp_k));
  }
  return { energy_ev, occupation_equilibrium: equilibriumF, occupation_electrons: electrons, occupation_holes: holes, ec_ev: diagram.ec_ev, ev_ev: diagram.ev_ev };
}
