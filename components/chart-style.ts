import { theme } from '@/components/theme';

/** Victory styles in Quasilevel's type and colours; axes carry units in their labels. */
export const chartStyle = {
  axis: {
    axis: { stroke: theme.color.inkSoft, strokeWidth: 1 },
    grid: { stroke: theme.color.sunken, strokeWidth: 1 },
    ticks: { stroke: theme.color.inkSoft, size: 3 },
    tickLabels: { fontFamily: theme.font.mono, fontSize: 10, fill: theme.color.inkSoft, padding: 3 },
    axisLabel: { fontFamily: theme.font.medium, fontSize: 11, fill: theme.color.ink, padding: 26 },
  },
  padding: { top: 12, right: 16, bottom: 44, left: 58 },
  measured: { data: { fill: theme.color.ink, opacity: 0.8 } },
  model: { data: { stroke: theme.color.electron, strokeWidth: 2 } },
  second: { data: { stroke: theme.color.hole, strokeWidth: 2, strokeDasharray: '5,4' } },
  mpp: { data: { fill: theme.color.hole, stroke: theme.color.ink, strokeWidth: 1 } },
} as const;

/** A tick formatter that keeps 3 significant figures without trailing noise. */
export function tick(v: number): string {
  if (v === 0) return '0';
  const a = Math.abs(v);
  if (a >= 1000 || a < 0.001) return v.toExponential(1);
  return String(Number(v.toPrecision(3)));
}
