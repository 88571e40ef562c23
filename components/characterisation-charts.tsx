import { VictoryAxis, VictoryChart, VictoryLine, VictoryScatter } from 'victory-native';
import { ChartFrame } from '@/components/chart-frame';
import { chartStyle, tick } from '@/components/chart-style';
import { theme } from '@/components/theme';
import type { Characterisation } from '@/lib/analysis/characterise';

const PADDING = { ...chartStyle.padding, left: 64 };
const COLOURS = { alpha: theme.color.electron, beta: theme.color.hole, gamma: theme.color.ink } as const;
const NAMES = { alpha: 'α Isc', beta: 'β Voc', gamma: 'γ Pmax' } as const;

/**
 * Isc, Voc and Pmax against cell temperature, each as % of its regression line's value at 25 °C,
 * with the regression lines 100 + coefficient·(T − 25): the three temperature coefficients are the
 * slopes, on one scale.
 */
export function CoefficientChart({ r, device, height = 240, testID }: { r: Characterisation['regression']; device: string; height?: number; testID?: string }) {
  const keys = ['alpha', 'beta', 'gamma'] as const;
  const t0 = Math.min(r.temp_min_c, 25);
  const t1 = Math.max(r.temp_max_c, 25);
  const ys = keys.flatMap((k) => [...r[k].points.map((p) => p.relative_pct), 100 + r[k].pct_per_k * (t0 - 25), 100 + r[k].pct_per_k * (t1 - 25)]);
  const pad = (Math.max(...ys) - Math.min(...ys)) * 0.08 || 1;
  const pct = (x: number, d = 3) => `${x > 0 ? '+' : x < 0 ? '−' : ''}${Math.abs(x).toFixed(d)}`;
  return (
    <ChartFrame
      height={height}
      testID={testID}
      download={{ name: `${device}-temperature-coefficients`, kind: 'coefficients', title: `Temperature coefficients of ${device}` }}
      caption={keys.map((k) => `● ${NAMES[k]} ${pct(r[k].pct_per_k)} %/K`).join('    ')}
    >
      {(width) => (
        <VictoryChart width={width} height={height} padding={PADDING} domain={{ x: [t0 - 2, t1 + 2], y: [Math.min(...ys) - pad, Math.max(...ys) + pad] }}>
          <VictoryAxis crossAxis={false} offsetY={PADDING.bottom} label="Cell temperature (°C)" style={chartStyle.axis} tickFormat={tick} tickCount={6} />
          <VictoryAxis dependentAxis crossAxis={false} offsetX={PADDING.left} label="% of the value at 25 °C" style={{ ...chartStyle.axis, axisLabel: { ...chartStyle.axis.axisLabel, padding: 44 } }} tickFormat={tick} tickCount={5} />
          {keys.map((k) => (
            <VictoryLine key={`l-${k}`} data={[{ x: t0, y: 100 + r[k].pct_per_k * (t0 - 25) }, { x: t1, y: 100 + r[k].pct_per_k * (t1 - 25) }]} style={{ data: { stroke: COLOURS[k], strokeWidth: 1.5 } }} />
          ))}
          {keys.map((k) => (
            <VictoryScatter key={`p-${k}`} data={r[k].points.map((p) => ({ x: p.temp_c, y: p.relative_pct }))} size={3.5} style={{ data: { fill: COLOURS[k] } }} />
          ))}
        </VictoryChart>
      )}
    </ChartFrame>
  );
}

/** Efficiency relative to its value at 1000 W/m², at 25 °C, against irradiance (from the matrix row at 25 °C). */
export function EfficiencyChart({ points, device, height = 220, testID }: { points: Characterisation['efficiency']; device: string; height?: number; testID?: string }) {
  const ys = points.map((p) => p.relative_efficiency_pct);
  const pad = (Math.max(...ys) - Math.min(...ys)) * 0.1 || 1;
  return (
    <ChartFrame
      height={height}
      testID={testID}
      download={{ name: `${device}-relative-efficiency`, kind: 'efficiency', title: `Relative efficiency of ${device} at 25 °C` }}
      caption="● measured   ○ translated (IEC 60891)"
    >
      {(width) => (
        <VictoryChart width={width} height={height} padding={PADDING} domain={{ x: [0, 1150], y: [Math.min(...ys) - pad, Math.max(...ys) + pad] }}>
          <VictoryAxis crossAxis={false} offsetY={PADDING.bottom} label="Irradiance (W/m²)" style={chartStyle.axis} tickFormat={(v: number) => String(Math.round(v))} tickValues={[0, 200, 400, 600, 800, 1000]} />
          <VictoryAxis dependentAxis crossAxis={false} offsetX={PADDING.left} label="Relative efficiency (%)" style={{ ...chartStyle.axis, axisLabel: { ...chartStyle.axis.axisLabel, padding: 44 } }} tickFormat={tick} tickCount={5} />
          <VictoryLine data={points.map((p) => ({ x: p.irradiance_wm2, y: p.relative_efficiency_pct }))} style={chartStyle.model} />
          <VictoryScatter
            data={points.map((p) => ({ x: p.irradiance_wm2, y: p.relative_efficiency_pct, measured: p.source === 'measured' }))}
            size={4}
            style={{ data: { fill: ({ datum }) => (datum.measured ? theme.color.electron : theme.color.surface), stroke: theme.color.electron, strokeWidth: 1.5 } }}
          />
        </VictoryChart>
      )}
    </ChartFrame>
  );
}
