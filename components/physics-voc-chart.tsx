import { VictoryAxis, VictoryChart, VictoryLine, VictoryScatter } from 'victory-native';
import { ChartFrame } from '@/components/chart-frame';
import { chartStyle, tick } from '@/components/chart-style';
import { sig4 } from '@/lib/charts/readout';

/**
 * Open-circuit voltage predicted from a fitted model across cell temperature, with the
 * measured Voc at the temperature the curve was taken at.
 */
export function PhysicsVocChart({
  points,
  measured,
  height = 240,
  testID,
}: {
  points: { temp_c: number; voc_v: number }[];
  measured?: { temp_c: number; voc_v: number } | null;
  height?: number;
  testID?: string;
}) {
  // Every 20 °C inside the chosen range; a narrow range gets the library's own ticks.
  const lo = Math.min(...points.map((p) => p.temp_c));
  const hi = Math.max(...points.map((p) => p.temp_c));
  const ticks = [-120, -100, -80, -60, -40, -20, 0, 20, 40, 60, 80, 100, 120, 140, 160, 180, 200, 220].filter((t) => t >= lo && t <= hi);
  return (
    <ChartFrame
      height={height}
      testID={testID}
      download={{ name: 'voc', kind: 'temperature', title: 'Open-circuit voltage against cell temperature' }}
      table={{
        columns: ['Cell temperature (°C)', 'Voc from the model (V)'],
        rows: [...points.map((p) => [sig4(p.temp_c), sig4(p.voc_v)]), ...(measured ? [[`${sig4(measured.temp_c)} (measured)`, sig4(measured.voc_v)]] : [])],
      }}
    >
      {(width) => (
        <VictoryChart width={width} height={height} padding={chartStyle.padding} domainPadding={{ y: 8 }}>
          <VictoryAxis crossAxis={false} offsetY={chartStyle.padding.bottom} label="Cell temperature (°C)" style={chartStyle.axis} tickFormat={tick} {...(ticks.length >= 3 ? { tickValues: ticks } : { tickCount: 5 })} />
          <VictoryAxis dependentAxis crossAxis={false} offsetX={chartStyle.padding.left} label="Voc (V)" style={chartStyle.axis} tickFormat={tick} tickCount={5} />
          <VictoryLine data={points.map((p) => ({ x: p.temp_c, y: p.voc_v }))} style={chartStyle.model} />
          {measured && measured.temp_c >= lo && measured.temp_c <= hi ? <VictoryScatter data={[{ x: measured.temp_c, y: measured.voc_v }]} size={6} symbol="diamond" style={chartStyle.mpp} /> : null}
        </VictoryChart>
      )}
    </ChartFrame>
  );
}
