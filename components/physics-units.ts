/** How the physics screen writes energies, densities and small voltages. */
import { sig } from '@/lib/format';

/** Electronvolts with `digits` decimals: "0.6589 eV". */
export const eV = (x: number, digits = 4) => `${x.toFixed(digits)} eV`;

/** A density in cm⁻³ to three significant digits, or a dash when there is none. */
export const cm3 = (x: number | null | undefined) => (x == null ? '—' : `${sig(x, 3)} cm⁻³`);

/** A signed difference in millivolts, two decimals (more digits when it is below 0.01 mV). */
export const mV = (x_V: number) => `${x_V >= 0 ? '+' : '−'}${Math.abs(x_V * 1000) >= 0.01 ? Math.abs(x_V * 1000).toFixed(2) : sig(Math.abs(x_V * 1000), 2)} mV`;
