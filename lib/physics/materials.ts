/**
 * Semiconductor material models: band gap Eg(T), effective densities of states Nc(T), Nv(T) and
 * intrinsic density n_i(T). Silicon is built in; another material is a `MaterialModel` built
 * from a parameter set with `materialFromParameters`.
 *
 * Silicon, and why these sources:
 * - n_i(T): Couderc, Amara & Lemiti (2014), J. Appl. Phys. 115:093705 —
 *   n_i = 1.541×10¹⁵·T^1.712·exp(−Eg(T)/2k_BT) cm⁻³, a re-evaluation of the Sproul–Green
 *   measurements with band-gap narrowing taken into account (the same correction as Altermatt
 *   et al. 2003). It gives 9.68×10⁹ cm⁻³ at 300 K (Altermatt: 9.65×10⁹) and follows the
 *   capacitance measurements of Misiakos & Tsamakis (1993) to < 1 % over 250–340 K.
 * - Eg(T): Pässler (2002), Phys. Rev. B 66:085201, silicon parameters E(0) = 1.170 eV,
 *   α = 3.23×10⁻⁴ eV/K, Θ = 446 K, Δ = 0.51 — the gap the n_i expression above was fitted with.
 * - Nc(T) = 2.86×10¹⁹·(T/300)^1.58, Nv(T) = 3.10×10¹⁹·(T/300)^1.85 cm⁻³: Green (1990),
 *   J. Appl. Phys. 67:2944 (power-law fits to his temperature-dependent effective masses).
 * These three are not exactly consistent: Nc·Nv·exp(−Eg/k_BT) exceeds n_i² by the few meV of
 * gap that the band-gap-narrowing correction moved. The statistics therefore use the gap implied
 * by n_i, `eg_dos_ev` = k_BT·ln(Nc·Nv/n_i²) (≈ Eg + 5 meV), so that n = p = n_i holds at E_i; the
 * band gap reported to users is Pässler's.
 */
import { KB_EV_PER_K } from '@/lib/physics/constants';
import { num, PhysicsError, requireFinite, requirePositive } from '@/lib/physics/errors';

/** A material the carrier-statistics functions can work with. Temperatures in K, densities in cm⁻³. */
export type MaterialModel = {
  id: string;
  name: string;
  /** Temperatures outside this range are rejected (the sources do not reach further). */
  temp_range_k: { min: number; max: number };
  /** Net doping above this (solid solubility) is rejected, cm⁻³. */
  max_doping_cm3: number;
  bandgap_eV: (temp_k: number) => number;
  nc_cm3: (temp_k: number) => number;
  nv_cm3: (temp_k: number) => number;
  ni_cm3: (temp_k: number) => number;
  /** Where each function comes from, for display beside the numbers. */
  sources: { bandgap: string; density_of_states: string; intrinsic_density: string; max_doping: string };
};

/** Everything the statistics need at one temperature. */
export type MaterialState = {
  temp_k: number;
  /** Band gap from the material's Eg(T) model, eV. */
  eg_ev: number;
  /** Gap implied by n_i and the densities of states, k_BT·ln(Nc·Nv/n_i²), eV; Ec − Ev in band diagrams. */
  eg_dos_ev: number;
  nc_cm3: number;
  nv_cm3: number;
  ni_cm3: number;
  /** k_B·T, eV. */
  kt_ev: number;
};

/** Pässler (2002) band gap with the dispersion-related parameters Θ (K) and Δ. */
function passlerGap(e0_eV: number, alpha_ev_per_k: number, theta_k: number, delta: number, temp_k: number): number {
  const xi = (2 * temp_k) / theta_k;
  const d2 = delta * delta;
  const bose = (1 - 3 * d2) / Math.expm1(theta_k / temp_k);
  const sum =
    1 +
    (Math.PI ** 2 * xi ** 2) / (3 * (1 + d2)) +
    ((3 * d2 - 1) / 4) * xi ** 3 +
    (8 / 3) * xi ** 4 +
    xi ** 6;
  return e0_eV - alpha_ev_per_k * theta_k * (bose + 1.5 * d2 * (Math.pow(sum, 1 / 6) - 1));
}

/** Crystalline silicon (sources in the file header). */
export const SILICON: MaterialModel = {
  id: 'si',
  name: 'crystalline silicon',
  temp_range_k: { min: 150, max: 500 },
  max_doping_cm3: 2e21,
  bandgap_eV: (temp_k) => passlerGap(1.17, 3.23e-4, 446, 0.51, temp_k),
  nc_cm3: (temp_k) => 2.86e19 * Math.pow(temp_k / 300, 1.58),
  nv_cm3: (temp_k) => 3.1e19 * Math.pow(temp_k / 300, 1.85),
  ni_cm3: (temp_k) =>
    1.541e15 * Math.pow(temp_k, 1.712) * Math.exp(-passlerGap(1.17, 3.23e-4, 446, 0.51, temp_k) / (2 * KB_EV_PER_K * temp_k)),
  sources: {
    bandgap: 'Pässler 2002, Phys. Rev. B 66:085201 (Si parameters as used by Couderc et al. 2014)',
    density_of_states: 'Green 1990, J. Appl. Phys. 67:2944',
    intrinsic_density: 'Couderc, Amara & Lemiti 2014, J. Appl. Phys. 115:093705 (consistent with Altermatt et al. 2003)',
    max_doping: 'solid solubility of P and As in Si, about 1–2×10²¹ cm⁻³ (Trumbore 1960, memory)',
  },
};

/** Parameter set for a material described by a Varshni gap and power-law densities of states. */
export type MaterialParameters = {
  id: string;
  name: string;
  /** Varshni: Eg(T) = eg0_ev − alpha_ev_per_k·T²/(T + beta_k). */
  eg0_ev: number;
  alpha_ev_per_k: number;
  beta_k: number;
  /** Nc(T) = nc300_cm3·(T/300)^ncExponent, likewise Nv. */
  nc300_cm3: number;
  ncExponent: number;
  nv300_cm3: number;
  nvExponent: number;
  temp_range_k: { min: number; max: number };
  max_doping_cm3: number;
  source: string;
};

/** Builds a MaterialModel whose n_i follows from Nc·Nv·exp(−Eg/k_BT) (self-consistent by construction). */
export function materialFromParameters(p: MaterialParameters): MaterialModel {
  for (const key of ['eg0_ev', 'nc300_cm3', 'nv300_cm3', 'max_doping_cm3'] as const) requirePositive(key, p[key]);
  for (const key of ['alpha_ev_per_k', 'beta_k', 'ncExponent', 'nvExponent'] as const) requireFinite(key, p[key]);
  requirePositive('temp_range_k.min', p.temp_range_k.min);
  if (!(p.temp_range_k.max > p.temp_range_k.min)) {
    throw new PhysicsError('temp_range_k.max', 'temp_range_k.max must be above temp_range_k.min');
  }
  const eg = (t: number) => p.eg0_ev - (p.alpha_ev_per_k * t * t) / (t + p.beta_k);
  const nc = (t: number) => p.nc300_cm3 * Math.pow(t / 300, p.ncExponent);
  const nv = (t: number) => p.nv300_cm3 * Math.pow(t / 300, p.nvExponent);
  return {
    id: p.id,
    name: p.name,
    temp_range_k: p.temp_range_k,
    max_doping_cm3: p.max_doping_cm3,
    bandgap_eV: eg,
    nc_cm3: nc,
    nv_cm3: nv,
    ni_cm3: (t) => Math.sqrt(nc(t) * nv(t)) * Math.exp(-eg(t) / (2 * KB_EV_PER_K * t)),
    sources: { bandgap: p.source, density_of_states: p.source, intrinsic_density: p.source, max_doping: p.source },
  };
}

/** Throws a PhysicsError naming `input` unless temp_k is a temperature the material model covers. */
export function checkTempK(temp_k: number, material: MaterialModel = SILICON, input = 'temp_k'): number {
  requireFinite(input, temp_k);
  if (temp_k <= 0) throw new PhysicsError(input, `${input} must be above 0 K (got ${num(temp_k)} K)`);
  const { min, max } = material.temp_range_k;
  if (temp_k < min || temp_k > max) {
    throw new PhysicsError(
      input,
      `${input} = ${num(temp_k)} K is outside the ${material.name} model's range ${min}–${max} K`,
    );
  }
  return temp_k;
}

/** Eg, Nc, Nv, n_i and the statistics gap of `material` at temp_k (kelvin). */
export function materialAt(temp_k: number, material: MaterialModel = SILICON): MaterialState {
  checkTempK(temp_k, material);
  const kt_ev = KB_EV_PER_K * temp_k;
  const nc_cm3 = material.nc_cm3(temp_k);
  const nv_cm3 = material.nv_cm3(temp_k);
  const ni_cm3 = material.ni_cm3(temp_k);
  const eg_ev = material.bandgap_eV(temp_k);
  const eg_dos_ev = kt_ev * (Math.log(nc_cm3) + Math.log(nv_cm3) - 2 * Math.log(ni_cm3));
  for (const [name, v] of Object.entries({ eg_ev, nc_cm3, nv_cm3, ni_cm3, eg_dos_ev })) {
    if (!Number.isFinite(v) || v <= 0) {
      throw new PhysicsError('material', `${material.name}: ${name} is not a positive finite number at ${temp_k} K`);
    }
  }
  return { temp_k, eg_ev, eg_dos_ev, nc_cm3, nv_cm3, ni_cm3, kt_ev };
}

/** Intrinsic carrier density n_i(T) of `material`, cm⁻³. */
export function intrinsicDensity_cm3(temp_k: number, material: MaterialModel = SILICON): number {
  return materialAt(temp_k, material).ni_cm3;
}
