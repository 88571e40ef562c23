import { VictoryAxis, VictoryChart, VictoryGroup, VictoryLine } from 'victory-native';
import { ChartFrame } from '@/components/chart-frame';
import { chartStyle, tick } from '@/components/chart-style';
import { theme } from '@/components/theme';
import type { OverlayCurve } from '@/lib/api/batches';

/** Many curves of a batch on one I-V chart; flagged devices stand out in amber. */
export function OverlayChart({ curves, height = 260, testID }: { curves: OverlayCurve[]; height?: number; testID?: string }) {
  const ordered = [...curves].sort((a, b) => Number(a.flagged) - Number(b.flagged));
  return (
    <ChartFrame height={height} testID={testID}>
      {(width) => (
        <VictoryChart width={width} height={height} padding={chartStyle.padding}>
          <VictoryAxis label="Voltage (V)" style={chartStyle.axis} tickFormat={tick} tickCount={6} />
          <VictoryAxis dependentAxis label="Current (A)" style={chartStyle.axis} tickFormat={tick} tickCount={5} />
          <VictoryGroup>
            {ordered.map((c) => (
              <VictoryLine
                key={c.id}
                data={c.voltage_v.map((v, k) => ({ x: v, y: c.current_a[k] })).filter((p) => p.y >= 0)}
                style={{ data: { stroke: c.flagged ? theme.color.hole : theme.color.electron, strokeWidth: c.flagged ? 1.6 : 1, opacity: c.flagged ? 0.95 : 0.45 } }}
              />
            ))}
          </VictoryGroup>
        </VictoryChart>
      )}
    </ChartFrame>
  );
}
