import { VictoryAxis, VictoryChart, VictoryLine, VictoryScatter } from 'victory-native';
import { ChartFrame } from '@/components/chart-frame';
import { chartStyle, tick } from '@/components/chart-style';

export type Series = { voltage_v: number[]; current_a: number[] };

/**
 * The measured points and fitted model(s) as an I-V or a P-V chart, with the maximum power
 * point marked. Model curves are drawn as lines, measurements as dots.
 */
export function IvChart({
  measured,
  model,
  second,
  mpp,
  mode,
  height = 260,
  testID,
}: {
  measured: Series;
  model?: Series | null;
  second?: Series | null;
  mpp?: { v: number; i: number } | null;
  mode: 'iv' | 'pv';
  height?: number;
  testID?: string;
}) {
  const y = (v: number, i: number) => (mode === 'iv' ? i : v * i);
  const pts = (s: Series) => s.voltage_v.map((v, k) => ({ x: v, y: y(v, s.current_a[k]) }));
  const dots = pts(measured);
  return (
    <ChartFrame height={height} testID={testID}>
      {(width) => (
        <VictoryChart width={width} height={height} padding={chartStyle.padding} domainPadding={{ y: 6 }}>
          <VictoryAxis label="Voltage (V)" style={chartStyle.axis} tickFormat={tick} tickCount={6} />
          <VictoryAxis dependentAxis label={mode === 'iv' ? 'Current (A)' : 'Power (W)'} style={chartStyle.axis} tickFormat={tick} tickCount={5} />
          {model ? <VictoryLine data={pts(model)} style={chartStyle.model} /> : null}
          {second ? <VictoryLine data={pts(second)} style={chartStyle.second} /> : null}
          <VictoryScatter data={dots} size={dots.length > 150 ? 1.5 : 2.5} style={chartStyle.measured} />
          {mpp ? <VictoryScatter data={[{ x: mpp.v, y: y(mpp.v, mpp.i) }]} size={6} symbol="diamond" style={chartStyle.mpp} /> : null}
        </VictoryChart>
      )}
    </ChartFrame>
  );
}
