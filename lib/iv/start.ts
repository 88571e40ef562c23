/**
 * Starting values for the diode fits from the curve's key points, after Phang, Chan & Phillips
 * (1984), Electron. Lett. 20:406: with the slopes at Isc (Rsh0) and at Voc (Rs0) and the MPP,
 * closed forms give n, I0, Rs and Iph. Measured slopes can be poor (quantised currents make
 * Rsh0 nearly infinite), so each value is kept inside a physically plausible range.
 */
import { thermal_voltage_v } from '@/lib/physics/constants';
import type { Metrics, SingleDiodeParams } from '@/lib/iv/types';

const clamp = (x: number, lo: number, hi: number) => Math.min(Math.max(x, lo), hi);

/** Phang et al. (1984) start for the single-diode model; n per cell, temp_c in °C. */
export function phangStart(metrics: Metrics, cells: number, temp_c: number): SingleDiodeParams {
  const { isc_a: isc, voc_v: voc, imp_a: imp, vmp_v: vmp } = metrics;
  const rRef = voc / isc;
  const vt = cells * thermal_voltage_v(temp_c);
  const rsh = clamp(metrics.rsh0_ohm ?? 1e3 * rRef, 10 * rRef, 1e6 * rRef);
  const rso = clamp(metrics.rs0_ohm ?? 0.1 * rRef, 1e-4 * rRef, rRef);

  const iscNet = isc - voc / rsh;
  const denom = Math.log(isc - vmp / rsh - imp) - Math.log(iscNet) + imp / iscNet;
  let a = (vmp + rso * imp - voc) / denom;
  if (!Number.isFinite(a) || a <= 0) a = 1.3 * vt;
  a = clamp(a, 0.7 * vt, 2.8 * vt);

  const i0 = iscNet * Math.exp(-voc / a);
  const rs = clamp(rso - a / iscNet, 1e-3 * rRef, 0.5 * rRef);
  const iph = isc * (1 + rs / rsh) + i0 * Math.expm1((isc * rs) / a);
  return { iph_a: iph, i0_a: i0, n: a / vt, rs_ohm: rs, rsh_ohm: rsh };
}
