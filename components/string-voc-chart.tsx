import { VictoryAxis, VictoryChart, VictoryLine, VictoryScatter } from 'victory-native';
import { ChartFrame } from '@/components/chart-frame';
import { chartStyle, tick } from '@/components/chart-style';

const PADDING = { ...chartStyle.padding, left: 64 };

/** Whole volts up to 10 kV (the shared tick formatter switches to exponents from 1000). */
const volts = (v: number): string => (Math.abs(v) < 10_000 ? String(Math.round(v)) : tick(v));
import { theme } from '@/components/theme';

/**
 * A string's open-circuit voltage against ambient temperature (cells at ambient, as at first
 * light): N·Voc,STC·(1 + β·(T − 25 °C)) from −40 to +40 °C (wider when the record low is outside),
 * with the system voltage limit as a line and the record low marked.
 */
export function StringVocChart({
  modules,
  voc_stc_v,
  beta_voc_pct_per_k,
  v_sys_v,
  t_min_c,
  height = 220,
  testID,
}: {
  modules: number;
  voc_stc_v: number;
  beta_voc_pct_per_k: number;
  v_sys_v: number;
  t_min_c: number;
  height?: number;
  testID?: string;
}) {
  const from = Math.min(-40, Math.floor(t_min_c / 5) * 5);
  const to = Math.max(40, Math.ceil(t_min_c / 5) * 5);
  const stringVoc = (t: number) => modules * voc_stc_v * (1 + (beta_voc_pct_per_k / 100) * (t - 25));
  const line = Array.from({ length: Math.round((to - from) / 2) + 1 }, (_, k) => from + 2 * k).map((t) => ({ x: t, y: stringVoc(t) }));
  const atMin = stringVoc(t_min_c);
  const over = atMin > v_sys_v;
  const ys = [...line.map((p) => p.y), v_sys_v];
  const yMin = Math.min(...ys);
  const yMax = Math.max(...ys);
  const pad = (yMax - yMin) * 0.08 || yMax * 0.05;
  const xTicks = Array.from({ length: Math.floor((to - from) / 20) + 1 }, (_, k) => from + 20 * k);
  return (
    <ChartFrame
      height={height}
      testID={testID}
      download={{ name: `string-${modules}-modules`, kind: 'voc', title: `String Voc of ${modules} modules against ambient temperature` }}
      table={{ columns: ['Ambient temperature (°C)', 'String Voc (V)', `System limit (V)`], rows: line.map((p) => [String(p.x), p.y.toFixed(1), String(v_sys_v)]) }}
      caption={`— ${modules} modules in series    - - system limit ${v_sys_v} V    ● record low ${t_min_c} °C: ${atMin.toFixed(1)} V${over ? ' (above the limit)' : ''}`}
    >
      {(width) => (
        <VictoryChart width={width} height={height} padding={PADDING} domain={{ x: [from, to], y: [Math.max(0, yMin - pad), yMax + pad] }}>
          <VictoryAxis crossAxis={false} offsetY={PADDING.bottom} label="Ambient temperature (°C)" style={chartStyle.axis} tickFormat={tick} tickValues={xTicks} />
          <VictoryAxis dependentAxis crossAxis={false} offsetX={PADDING.left} label="String Voc (V)" style={{ ...chartStyle.axis, axisLabel: { ...chartStyle.axis.axisLabel, padding: 40 } }} tickFormat={volts} tickCount={5} />
          <VictoryLine data={[{ x: from, y: v_sys_v }, { x: to, y: v_sys_v }]} style={{ data: { stroke: theme.color.danger, strokeWidth: 1.5, strokeDasharray: '6,4' } }} />
          <VictoryLine data={line} style={chartStyle.model} />
          <VictoryScatter data={[{ x: t_min_c, y: atMin }]} size={5} style={{ data: { fill: over ? theme.color.danger : theme.color.hole, stroke: theme.color.ink, strokeWidth: 1 } }} />
        </VictoryChart>
      )}
    </ChartFrame>
  );
}
