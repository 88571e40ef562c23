/** The text of the pointer readout under an I-V chart: one measured point's V, I and P = V·I. */

/** Significant figures like the tables: 4, without exponent noise for everyday values. */
export function sig4(v: number): string {
  if (v === 0) return '0';
  const a = Math.abs(v);
  if (a >= 1e5 || a < 1e-4) return v.toExponential(3);
  return v.toPrecision(4);
}

/** "V = 0.4520 V · I = 0.6900 A · P = 0.3119 W", optionally after a label (the device id on the overlay). */
export function ivReadout(voltage_v: number, current_a: number, label?: string): string {
  const text = `V = ${sig4(voltage_v)} V · I = ${sig4(current_a)} A · P = ${sig4(voltage_v * current_a)} W`;
  return label ? `${label}: ${text}` : text;
}
