import { VictoryAxis, VictoryChart, VictoryLine, VictoryScatter } from 'victory-native';
import { ChartFrame } from '@/components/chart-frame';
import { chartStyle, tick } from '@/components/chart-style';
import { LOG_CHART, powerOfTenTick } from '@/components/physics-ticks';
import { theme } from '@/components/theme';
import { sig4 } from '@/lib/charts/readout';

/**
 * Intrinsic carrier density of silicon against temperature (log scale), with the temperature
 * being explored and a published reference point marked.
 */
export function PhysicsNiChart({
  series,
  current,
  reference,
  height = 220,
  testID,
}: {
  series: { temp_k: number[]; ni_cm3: number[] };
  current?: { temp_k: number; ni_cm3: number } | null;
  reference?: { temp_k: number; ni_cm3: number } | null;
  height?: number;
  testID?: string;
}) {
  const data = series.temp_k.map((t, k) => ({ x: t, y: series.ni_cm3[k] }));
  const eMin = Math.floor(Math.log10(Math.min(...series.ni_cm3)));
  const eMax = Math.ceil(Math.log10(Math.max(...series.ni_cm3)));
  const ticks: number[] = [];
  for (let e = eMin; e <= eMax; e += eMax - eMin > 6 ? 2 : 1) ticks.push(10 ** e);
  const inRange = (t: number) => t >= series.temp_k[0] && t <= series.temp_k[series.temp_k.length - 1];
  return (
    <ChartFrame height={height} testID={testID} download={{ name: 'intrinsic-density', kind: 'temperature', title: 'Intrinsic carrier density against temperature' }} table={{ columns: ['Temperature (K)', 'n_i (cm⁻³)'], rows: data.map((p) => [sig4(p.x), sig4(p.y)]) }}>
      {(width) => (
        <VictoryChart width={width} height={height} padding={LOG_CHART.padding} scale={{ y: 'log' }} domain={{ y: [10 ** eMin, 10 ** eMax] }}>
          <VictoryAxis crossAxis={false} offsetY={LOG_CHART.padding.bottom} label="Temperature (K)" style={chartStyle.axis} tickFormat={tick} tickCount={5} />
          <VictoryAxis dependentAxis crossAxis={false} offsetX={LOG_CHART.padding.left} label="n_i (cm⁻³)" style={LOG_CHART.yAxis} tickValues={ticks} tickFormat={powerOfTenTick} />
          <VictoryLine data={data} style={chartStyle.model} />
          {reference && inRange(reference.temp_k) ? (
            <VictoryScatter data={[{ x: reference.temp_k, y: reference.ni_cm3 }]} size={6} symbol="diamond" style={chartStyle.mpp} />
          ) : null}
          {current && inRange(current.temp_k) ? (
            <VictoryScatter data={[{ x: current.temp_k, y: current.ni_cm3 }]} size={4} style={{ data: { fill: theme.color.ink } }} />
          ) : null}
        </VictoryChart>
      )}
    </ChartFrame>
  );
}
