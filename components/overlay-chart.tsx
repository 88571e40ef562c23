import { useMemo } from 'react';
import { VictoryAxis, VictoryChart, VictoryLine } from 'victory-native';
import { ChartFrame } from '@/components/chart-frame';
import { ChartPointer } from '@/components/chart-pointer';
import { chartStyle, tick } from '@/components/chart-style';
import { theme } from '@/components/theme';
import type { OverlayCurve } from '@/lib/api/batches';
import { overlayTones } from '@/lib/charts/overlay-tones';
import type { OverlayTone } from '@/lib/charts/overlay-tones';
import { domainOf, edgeAxes } from '@/lib/charts/plot-frame';
import type { Point } from '@/lib/charts/plot-frame';
import { ivReadout, sig4 } from '@/lib/charts/readout';
import type { LegendItem } from '@/lib/charts/svg-file';

const AXES = edgeAxes(chartStyle.padding);

/** Failing curves in the danger colour on top, warnings in amber; passing ones in one neutral grey, thin and faint, behind them. */
export const TONE_STYLE: Record<OverlayTone, { stroke: string; strokeWidth: number; opacity: number }> = {
  fail: { stroke: theme.color.danger, strokeWidth: 1.8, opacity: 0.95 },
  warn: { stroke: theme.color.hole, strokeWidth: 1.6, opacity: 0.95 },
  pass: { stroke: theme.color.muted, strokeWidth: 1, opacity: 0.35 },
};

/**
 * Many curves of a batch on one I-V chart. Only failing and warning devices are coloured (each
 * curve's severity comes with the overlay answer: the batch's spec, else the flags); the legend
 * counts them with the same rule that colours them. The pointer reads the nearest point of any
 * curve, with its device id.
 */
export function OverlayChart({ curves, batch_name, height = 260, testID }: { curves: OverlayCurve[]; batch_name?: string; height?: number; testID?: string }) {
  const { ordered, counts } = useMemo(() => overlayTones(curves), [curves]);
  const lines = useMemo(
    () => ordered.map(({ curve, tone }) => ({ curve, tone, data: curve.voltage_v.map((v, k) => ({ x: v, y: curve.current_a[k] })).filter((p) => p.y >= 0) })),
    [ordered],
  );
  // Every drawn point, with the curve it belongs to, for the pointer.
  const all = useMemo(() => lines.flatMap((l) => l.data.map((p) => ({ ...p, curve: l.curve }))), [lines]);
  const domain = useMemo(() => domainOf([all as Point[]]), [all]);
  const legend: LegendItem[] = [
    { label: `${counts.fail} failing`, colour: TONE_STYLE.fail.stroke, mark: 'line' },
    { label: `${counts.warn} with warnings`, colour: TONE_STYLE.warn.stroke, mark: 'line' },
    { label: `${counts.pass} passing`, colour: TONE_STYLE.pass.stroke, mark: 'line' },
  ];
  return (
    <ChartFrame
      height={height}
      testID={testID}
      legend={legend}
      download={{ name: batch_name ?? 'batch', kind: 'overlay', title: `${batch_name ?? 'Batch'}: I-V curves` }}
      name={`${batch_name ?? 'Batch'}: ${curves.length} I-V curves, ${counts.fail} failing, ${counts.warn} with warnings`}
      table={{ columns: ['Device', 'Voltage (V)', 'Current (A)'], rows: all.map((p) => [p.curve.device_id, sig4(p.x), sig4(p.y)]) }}
    >
      {(width) => (
        <ChartPointer
          frame={{ width, height, padding: chartStyle.padding, domain }}
          points={all}
          describe={(k) => ivReadout(all[k].x, all[k].y, all[k].curve.device_id)}
          hint="Point at a curve to read its device, V, I and P."
          testID={testID}
        >
          <VictoryChart width={width} height={height} padding={chartStyle.padding} domain={domain}>
            <VictoryAxis {...AXES.x} label="Voltage (V)" style={chartStyle.axis} tickFormat={tick} tickCount={6} />
            <VictoryAxis dependentAxis {...AXES.y} label="Current (A)" style={chartStyle.axis} tickFormat={tick} tickCount={5} />
            {lines.map((l) => (
              <VictoryLine key={l.curve.id} data={l.data} style={{ data: TONE_STYLE[l.tone] }} />
            ))}
          </VictoryChart>
        </ChartPointer>
      )}
    </ChartFrame>
  );
}
