/**
 * Carrier densities, the equilibrium Fermi level and the quasi-Fermi levels under injection,
 * with Fermi–Dirac statistics and, beside them, the Boltzmann approximation.
 *
 * Energies are in eV measured from the intrinsic level E_i (the Boltzmann position where
 * n = p = n_i): Ec = k_BT·ln(Nc/n_i), Ev = −k_BT·ln(Nv/n_i), so Ec − Ev is the statistics gap
 * `egDos_eV` of the material model. Dopants are taken as fully ionised and the excess carriers
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
import { PhysicsError, requireFinite, requireNonNegative, requirePositive } from '@/lib/physics/errors';
import { materialAt, SILICON } from '@/lib/physics/materials';
import type { MaterialModel, MaterialState } from '@/lib/physics/materials';

export type DopingType = 'n' | 'p';

/** Band edges at one temperature, eV from E_i. */
export type BandEdges = { ec_eV: number; ev_eV: number; ei_eV: 0; gap_eV: number; kT_eV: number };

/** Band edges of `material` at tempK, eV measured from the intrinsic level. */
export function bandEdges(tempK: number, material: MaterialModel = SILICON): BandEdges {
  return edgesOf(materialAt(tempK, material));
}

function edgesOf(s: MaterialState): BandEdges {
  const ec_eV = s.kT_eV * Math.log(s.nc_cm3 / s.ni_cm3);
  const ev_eV = -s.kT_eV * Math.log(s.nv_cm3 / s.ni_cm3);
  return { ec_eV, ev_eV, ei_eV: 0, gap_eV: ec_eV - ev_eV, kT_eV: s.kT_eV };
}

/** Electron and hole densities for a Fermi level, Fermi–Dirac and Boltzmann. */
export type CarrierDensities = {
  n_cm3: number;
  p_cm3: number;
  /** Reduced Fermi levels η_n = (E_F − Ec)/k_BT and η_p = (Ev − E_F)/k_BT. */
  etaN: number;
  etaP: number;
  boltzmann: { n_cm3: number; p_cm3: number };
  /** (Boltzmann − Fermi–Dirac)/Fermi–Dirac: how far the approximation is off. */
  boltzmannError: { n: number; p: number };
};

/** n = Nc·F½(η_n), p = Nv·F½(η_p) for a Fermi level fermiLevel_eV measured from E_i. */
export function carrierDensities(
  fermiLevel_eV: number,
  tempK: number,
  material: MaterialModel = SILICON,
): CarrierDensities {
  requireFinite('fermiLevel_eV', fermiLevel_eV);
  const s = materialAt(tempK, material);
  const e = edgesOf(s);
  const etaN = (fermiLevel_eV - e.ec_eV) / s.kT_eV;
  const etaP = (e.ev_eV - fermiLevel_eV) / s.kT_eV;
  if (etaN > ETA_RANGE.max || etaP > ETA_RANGE.max) {
    throw new PhysicsError(
      'fermiLevel_eV',
      `fermiLevel_eV = ${fermiLevel_eV} lies more than ${ETA_RANGE.max}·k_BT inside a band (outside the supported range)`,
    );
  }
  const n_cm3 = s.nc_cm3 * fermiHalfExtended(etaN);
  const p_cm3 = s.nv_cm3 * fermiHalfExtended(etaP);
  const nB = s.nc_cm3 * Math.exp(etaN);
  const pB = s.nv_cm3 * Math.exp(etaP);
  return {
    n_cm3,
    p_cm3,
    etaN,
    etaP,
    boltzmann: { n_cm3: nB, p_cm3: pB },
    boltzmannError: { n: nB / n_cm3 - 1, p: pB / p_cm3 - 1 },
  };
}

/** Doping and temperature of a piece of material. */
export type DopingInput = {
  type: DopingType;
  /** Net ionised dopant density, cm⁻³ (0 = intrinsic). */
  doping_cm3: number;
  tempK: number;
};

function checkDoping(input: DopingInput, material: MaterialModel): void {
  if (input.type !== 'n' && input.type !== 'p') {
    throw new PhysicsError('type', `type must be "n" or "p" (got ${String(input.type)})`);
  }
  requireNonNegative('doping_cm3', input.doping_cm3);
  if (input.doping_cm3 > material.maxDoping_cm3) {
    throw new PhysicsError(
      'doping_cm3',
      `doping_cm3 = ${input.doping_cm3} exceeds the solubility limit of dopants in ${material.name} (${material.maxDoping_cm3.toExponential(1)} cm⁻³)`,
    );
  }
}

/**
 * Equilibrium Fermi level (eV from E_i) from charge neutrality n − p = N_D (n-type) or
 * p − n = N_A (p-type), Fermi–Dirac statistics. Newton on E_F inside a bisection bracket.
 */
function solveNeutrality(s: MaterialState, e: BandEdges, netDonors_cm3: number): number {
  const kT = s.kT_eV;
  // A hair inside η = 100 so that rounding at the bracket ends never leaves the supported range.
  const reach = (ETA_RANGE.max - 1e-6) * kT;
  let lo = e.ev_eV - reach;
  let hi = e.ec_eV + reach;
  // Start from the Boltzmann answer, which is exact unless the material is degenerate.
  const nB = netDonors_cm3 / 2 + Math.sqrt((netDonors_cm3 * netDonors_cm3) / 4 + s.ni_cm3 * s.ni_cm3);
  let ef = Math.min(hi, Math.max(lo, kT * Math.log(nB / s.ni_cm3)));
  for (let iter = 0; iter < 200; iter++) {
    const etaN = (ef - e.ec_eV) / kT;
    const etaP = (e.ev_eV - ef) / kT;
    const n = s.nc_cm3 * fermiHalfExtended(etaN);
    const p = s.nv_cm3 * fermiHalfExtended(etaP);
    const dn = (s.nc_cm3 / kT) * fermiMinusHalfExtended(etaN);
    const dp = -(s.nv_cm3 / kT) * fermiMinusHalfExtended(etaP);
    // Compare logarithms (the two sides span dozens of decades on the way in); both sides are
    // positive sums, so neither logarithm can see a zero or a cancellation.
    const left = netDonors_cm3 >= 0 ? n : n - netDonors_cm3;
    const right = netDonors_cm3 >= 0 ? p + netDonors_cm3 : p;
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
  tempK: number;
  material: MaterialState;
  edges: BandEdges;
  /** Equilibrium Fermi level, eV from E_i. */
  ef_eV: number;
  n0_cm3: number;
  p0_cm3: number;
  /** Whether a band is within 2·k_BT of the Fermi level (Boltzmann off by > 4 %). */
  degenerate: boolean;
  boltzmann: { ef_eV: number; n0_cm3: number; p0_cm3: number };
};

/** Equilibrium Fermi level and carrier densities for a doping (Fermi–Dirac, Boltzmann beside it). */
export function equilibrium(input: DopingInput, material: MaterialModel = SILICON): EquilibriumState {
  checkDoping(input, material);
  const s = materialAt(input.tempK, material);
  const edges = edgesOf(s);
  const net = input.type === 'n' ? input.doping_cm3 : -input.doping_cm3;
  const ef_eV = solveNeutrality(s, edges, net);
  const d = carrierDensities(ef_eV, input.tempK, material);
  const half = Math.abs(net) / 2;
  const majorityB = half + Math.sqrt(half * half + s.ni_cm3 * s.ni_cm3);
  const minorityB = (s.ni_cm3 * s.ni_cm3) / majorityB;
  const n0B = input.type === 'n' ? majorityB : minorityB;
  const p0B = input.type === 'n' ? minorityB : majorityB;
  return {
    tempK: input.tempK,
    material: s,
    edges,
    ef_eV,
    n0_cm3: d.n_cm3,
    p0_cm3: d.p_cm3,
    degenerate: d.etaN > -2 || d.etaP > -2,
    boltzmann: { ef_eV: s.kT_eV * Math.log(n0B / s.ni_cm3), n0_cm3: n0B, p0_cm3: p0B },
  };
}

/** Doping plus an injection: either an excess density or a generation rate with a lifetime. */
export type InjectionInput = DopingInput & {
  /** Excess carrier density Δn = Δp, cm⁻³. */
  excess_cm3?: number;
  /** Generation rate, cm⁻³·s⁻¹ (with lifetime_s: Δn = G·τ). */
  generation_cm3s?: number;
  /** Effective carrier lifetime, s. */
  lifetime_s?: number;
};

/** Quasi-Fermi levels under injection, eV from E_i; Boltzmann results under `boltzmann`. */
export type QuasiFermiState = EquilibriumState & {
  excess_cm3: number;
  n_cm3: number;
  p_cm3: number;
  efn_eV: number;
  efp_eV: number;
  /** E_Fn − E_Fp, eV. */
  splitting_eV: number;
  /** splitting/q, V: the most voltage the material can deliver at this injection. */
  impliedVoc_V: number;
  etaN: number;
  etaP: number;
  boltzmann: EquilibriumState['boltzmann'] & {
    efn_eV: number;
    efp_eV: number;
    splitting_eV: number;
    impliedVoc_V: number;
  };
};

function excessOf(input: InjectionInput): number {
  const hasExcess = input.excess_cm3 !== undefined;
  const hasRate = input.generation_cm3s !== undefined || input.lifetime_s !== undefined;
  if (hasExcess && hasRate) {
    throw new PhysicsError('excess_cm3', 'give either excess_cm3 or generation_cm3s with lifetime_s, not both');
  }
  if (hasExcess) return requireNonNegative('excess_cm3', input.excess_cm3 as number);
  if (!hasRate) throw new PhysicsError('excess_cm3', 'excess_cm3 (or generation_cm3s with lifetime_s) is required');
  if (input.generation_cm3s === undefined) throw new PhysicsError('generation_cm3s', 'generation_cm3s is required with lifetime_s');
  if (input.lifetime_s === undefined) throw new PhysicsError('lifetime_s', 'lifetime_s is required with generation_cm3s');
  requireNonNegative('generation_cm3s', input.generation_cm3s);
  requirePositive('lifetime_s', input.lifetime_s);
  const excess = input.generation_cm3s * input.lifetime_s;
  return requireFinite('generation_cm3s', excess);
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
  const etaN = inverseDensity('excess_cm3', n_cm3 / s.nc_cm3);
  const etaP = inverseDensity('excess_cm3', p_cm3 / s.nv_cm3);
  const efn_eV = excess_cm3 === 0 ? eq.ef_eV : eq.edges.ec_eV + s.kT_eV * etaN;
  const efp_eV = excess_cm3 === 0 ? eq.ef_eV : eq.edges.ev_eV - s.kT_eV * etaP;
  const nB = eq.boltzmann.n0_cm3 + excess_cm3;
  const pB = eq.boltzmann.p0_cm3 + excess_cm3;
  const efnB = s.kT_eV * Math.log(nB / s.ni_cm3);
  const efpB = -s.kT_eV * Math.log(pB / s.ni_cm3);
  const splittingB = excess_cm3 === 0 ? 0 : efnB - efpB;
  const splitting_eV = efn_eV - efp_eV;
  return {
    ...eq,
    excess_cm3,
    n_cm3,
    p_cm3,
    efn_eV,
    efp_eV,
    splitting_eV,
    impliedVoc_V: splitting_eV,
    etaN,
    etaP,
    degenerate: eq.degenerate || etaN > -2 || etaP > -2,
    boltzmann: {
      ...eq.boltzmann,
      efn_eV: excess_cm3 === 0 ? eq.boltzmann.ef_eV : efnB,
      efp_eV: excess_cm3 === 0 ? eq.boltzmann.ef_eV : efpB,
      splitting_eV: splittingB,
      impliedVoc_V: splittingB,
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
export type BandLevel = { key: 'Ec' | 'Ev' | 'Ei' | 'EF' | 'EFn' | 'EFp'; energy_eV: number };

/** The energies a band diagram draws, eV from E_i, plus the splitting and implied Voc. */
export type BandDiagram = {
  tempK: number;
  levels: BandLevel[];
  ec_eV: number;
  ev_eV: number;
  ei_eV: 0;
  ef_eV: number;
  efn_eV: number;
  efp_eV: number;
  splitting_eV: number;
  impliedVoc_V: number;
  boltzmannSplitting_eV: number;
  ni_cm3: number;
  degenerate: boolean;
};

/** Band diagram of doped material under injection: Ec, Ev, Ei, E_F, E_Fn, E_Fp in eV from E_i. */
export function bandDiagram(input: InjectionInput, material: MaterialModel = SILICON): BandDiagram {
  const q = quasiFermiLevels(input, material);
  return {
    tempK: q.tempK,
    levels: [
      { key: 'Ec', energy_eV: q.edges.ec_eV },
      { key: 'EFn', energy_eV: q.efn_eV },
      { key: 'EF', energy_eV: q.ef_eV },
      { key: 'Ei', energy_eV: 0 },
      { key: 'EFp', energy_eV: q.efp_eV },
      { key: 'Ev', energy_eV: q.edges.ev_eV },
    ],
    ec_eV: q.edges.ec_eV,
    ev_eV: q.edges.ev_eV,
    ei_eV: 0,
    ef_eV: q.ef_eV,
    efn_eV: q.efn_eV,
    efp_eV: q.efp_eV,
    splitting_eV: q.splitting_eV,
    impliedVoc_V: q.impliedVoc_V,
    boltzmannSplitting_eV: q.boltzmann.splitting_eV,
    ni_cm3: q.material.ni_cm3,
    degenerate: q.degenerate,
  };
}

/** Samples of the occupation functions for a chart. */
export type OccupationCurve = {
  energy_eV: number[];
  /** f(E) with the equilibrium Fermi level. */
  equilibrium: number[];
  /** Electron occupation f(E) with E_Fn (read it near and above Ec). */
  electrons: number[];
  /** Hole occupation 1 − f(E) with E_Fp (read it near and below Ev). */
  holes: number[];
  ec_eV: number;
  ev_eV: number;
};

/**
 * f(E) sampled over [Ev − margin, Ec + margin] (eV from E_i) for a band diagram's Fermi levels:
 * equilibrium, electrons with E_Fn, holes with E_Fp. margin_eV defaults to 8·k_BT, points to 161.
 */
export function occupationCurve(
  diagram: Pick<BandDiagram, 'tempK' | 'ec_eV' | 'ev_eV' | 'ef_eV' | 'efn_eV' | 'efp_eV'>,
  options: { points?: number; margin_eV?: number } = {},
): OccupationCurve {
  const points = options.points ?? 161;
  if (!Number.isInteger(points) || points < 2 || points > 10000) {
    throw new PhysicsError('points', `points must be an integer from 2 to 10000 (got ${points})`);
  }
  requirePositive('tempK', diagram.tempK);
  const margin = options.margin_eV ?? 8 * KB_EV_PER_K * diagram.tempK;
  requirePositive('margin_eV', margin);
  const lo = diagram.ev_eV - margin;
  const hi = diagram.ec_eV + margin;
  const energy_eV: number[] = [];
  const equilibriumF: number[] = [];
  const electrons: number[] = [];
  const holes: number[] = [];
  for (let i = 0; i < points; i++) {
    const e = lo + ((hi - lo) * i) / (points - 1);
    energy_eV.push(e);
    equilibriumF.push(fermiOccupation(e, diagram.ef_eV, diagram.tempK));
    electrons.push(fermiOccupation(e, diagram.efn_eV, diagram.tempK));
    // 1 − f(E) = f(2·E_F − E): no cancellation deep below E_Fp.
    holes.push(fermiOccupation(2 * diagram.efp_eV - e, diagram.efp_eV, diagram.tempK));
  }
  return { energy_eV, equilibrium: equilibriumF, electrons, holes, ec_eV: diagram.ec_eV, ev_eV: diagram.ev_eV };
}
