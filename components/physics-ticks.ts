import { chartStyle } from '@/components/chart-style';

/** Tick label of a log axis at a power of ten: 1e-15 → "10⁻¹⁵", 1 → "1". */
export function powerOfTenTick(v: number): string {
  const e = Math.round(Math.log10(v));
  if (e === 0) return '1';
  const sup = '⁰¹²³⁴⁵⁶⁷⁸⁹';
  return `10${String(e).replace('-', '⁻').replace(/\d/g, (d) => sup[Number(d)])}`;
}

/** Powers of ten are wider tick labels than plain numbers: log charts give their y axis more room. */
export const LOG_CHART = {
  padding: { ...chartStyle.padding, top: 24, left: 70 },
  yAxis: { ...chartStyle.axis, axisLabel: { ...chartStyle.axis.axisLabel, padding: 40 } },
} as const;
