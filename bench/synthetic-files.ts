/**
 * Synthetic upload files for the benchmarks, the load run and the crash test: 200-point I-V curves
 * from the engine's own single-diode generator (`simulateCurve`), half single cells and half
 * 60-cell modules, written as a flash line writes them (`# key: value` lines, then V,I columns).
 * Deterministic for a given seed, so every run uploads the same bytes.
 */
import { seededRandom, simulateCurve, singleDiodeVoltage } from '@/lib/iv';
import type { SingleDiodeParams } from '@/lib/iv';

export type SyntheticFile = {
  /** File name, `<deviceId>.csv`. */
  name: string;
  deviceId: string;
  cells: number;
  temp_c: number;
  /** The file's text, as uploaded. */
  text: string;
  /** The points as written to the file (rounded to 5 decimals, as parsed back by the server). */
  voltage_v: number[];
  current_a: number[];
};

export const SYNTHETIC_POINTS = 200;

/**
 * `count` synthetic files; device k is a cell when k is even, a 60-cell module when odd.
 * Parameter ranges are typical of crystalline silicon (common practice), as in bench/iv-fit.ts.
 */
export function syntheticFiles(count: number, opts: { seed?: number; prefix?: string } = {}): SyntheticFile[] {
  const seed = opts.seed ?? 20260101;
  const prefix = opts.prefix ?? 'SYN';
  const rand = seededRandom(seed);
  const between = (lo: number, hi: number) => lo + (hi - lo) * rand();
  const logBetween = (lo: number, hi: number) => Math.exp(between(Math.log(lo), Math.log(hi)));
  const out: SyntheticFile[] = [];
  for (let k = 0; k < count; k++) {
    const cells = k % 2 === 0 ? 1 : 60;
    const temp_c = Math.round(between(22, 30) * 10) / 10;
    const iph = between(9, 11);
    const n = between(1.0, 1.4);
    const params: SingleDiodeParams = {
      iph_a: iph,
      i0_a: logBetween(1e-11, 1e-9) * Math.exp((n - 1) * 12),
      n,
      rs_ohm: cells * between(0.002, 0.006),
      rsh_ohm: cells * logBetween(10, 100),
    };
    const voc = singleDiodeVoltage(params, 0, cells, temp_c);
    const curve = simulateCurve(params, { cells, temp_c, points: SYNTHETIC_POINTS, vMin: -0.02 * voc, vMax: 1.02 * voc, noise_a: 0.001 * iph, seed: seed + k });
    const deviceId = `${prefix}-${cells === 1 ? 'C' : 'M'}-${String(k + 1).padStart(5, '0')}`;
    const voltage_v = curve.voltage_v.map((v) => Number(v.toFixed(5)));
    const current_a = curve.current_a.map((i) => Number(i.toFixed(5)));
    const lines = [
      `# device: ${deviceId}`,
      `# cell temperature: ${temp_c}`,
      '# irradiance: 1000',
      `# cells in series: ${cells}`,
      `# area: ${cells === 1 ? 244.3 : 16610}`,
      'Voltage (V),Current (A)',
      ...voltage_v.map((v, j) => `${v.toFixed(5)},${current_a[j].toFixed(5)}`),
    ];
    out.push({ name: `${deviceId}.csv`, deviceId, cells, temp_c, text: lines.join('\n') + '\n', voltage_v, current_a });
  }
  return out;
}
