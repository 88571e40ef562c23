/**
 * Physical constants used everywhere in Quasilevel. One module, one source each:
 * CODATA 2018 exact values (SI redefinition of 2019).
 */

/** Elementary charge, C (CODATA 2018, exact). */
export const Q_C = 1.602176634e-19;

/** Boltzmann constant, J/K (CODATA 2018, exact). */
export const KB_J_PER_K = 1.380649e-23;

/** Boltzmann constant in eV/K: k_B / q. */
export const KB_EV_PER_K = KB_J_PER_K / Q_C;

/** 0 °C in kelvin. */
export const ZERO_C_IN_K = 273.15;

/** Thermal voltage k_B·T/q in volts at a cell temperature in °C. */
export function thermal_voltage_v(temp_c: number): number {
  return (KB_J_PER_K * (temp_c + ZERO_C_IN_K)) / Q_C;
}

/** Standard test conditions (IEC 60904-3 / IEC 61215): 1000 W/m², 25 °C cell temperature. */
export const STC = { irradiance_w_m2: 1000, temp_c: 25 } as const;
