import { VictoryAxis, VictoryChart, VictoryLine, VictoryScatter } from 'victory-native';
import { ChartFrame } from '@/components/chart-frame';
import { chartStyle, tick } from '@/components/chart-style';
import { theme } from '@/components/theme';

/** Residuals (measured − model current, in mA) against voltage for one or two fits. */
export function ResidualChart({ voltage_v, residuals, labels, height = 180, testID }: { voltage_v: number[]; residuals: number[][]; labels: string[]; height?: number; testID?: string }) {
  const colours = [theme.color.electron, theme.color.hole];
  const vMin = Math.min(...voltage_v);
  const vMax = Math.max(...voltage_v);
  return (
    <ChartFrame height={height} testID={testID} caption={labels.map((l, k) => `${k === 0 ? '●' : '◆'} ${l}`).join('    ')}>
      {(width) => (
        <VictoryChart width={width} height={height} padding={chartStyle.padding}>
          <VictoryAxis label="Voltage (V)" style={chartStyle.axis} tickFormat={tick} tickCount={6} />
          <VictoryAxis dependentAxis label="Residual (mA)" style={chartStyle.axis} tickFormat={tick} tickCount={5} />
          <VictoryLine data={[{ x: vMin, y: 0 }, { x: vMax, y: 0 }]} style={{ data: { stroke: theme.color.muted, strokeWidth: 1 } }} />
          {residuals.map((r, k) => (
            <VictoryScatter
              key={labels[k]}
              data={r.map((y, j) => ({ x: voltage_v[j], y: y * 1000 }))}
              size={2.5}
              symbol={k === 0 ? 'circle' : 'diamond'}
              style={{ data: { fill: colours[k % 2] } }}
            />
          ))}
        </VictoryChart>
      )}
    </ChartFrame>
  );
}
