import { VictoryAxis, VictoryChart, VictoryLine, VictoryScatter } from 'victory-native';
import { ChartFrame } from '@/components/chart-frame';
import type { ChartDownload } from '@/components/chart-frame';
import { chartStyle, tick } from '@/components/chart-style';
import { theme } from '@/components/theme';
import { domainOf, edgeAxes } from '@/lib/charts/plot-frame';
import { sig4 } from '@/lib/charts/readout';
import type { LegendItem } from '@/lib/charts/svg-file';

const AXES = edgeAxes(chartStyle.padding);
const COLOURS = [theme.color.electron, theme.color.hole];

/**
 * Residuals (measured − model current, in mA) against voltage for one or two fits. The zero
 * line is drawn as data; the axes stay on the plot's edges.
 */
export function ResidualChart({ voltage_v, residuals, labels, download, height = 180, testID }: { voltage_v: number[]; residuals: number[][]; labels: string[]; download?: string; height?: number; testID?: string }) {
  const sets = residuals.map((r) => r.map((y, j) => ({ x: voltage_v[j], y: y * 1000 })));
  const domain = domainOf([...sets, [{ x: voltage_v[0], y: 0 }]]);
  const legend: LegendItem[] = labels.map((l, k) => ({ label: l, colour: COLOURS[k % 2], mark: k === 0 ? 'dot' : 'diamond' }));
  const table = {
    columns: ['Voltage (V)', ...labels.map((l) => `${l}: residual (mA)`)],
    rows: voltage_v.map((v, j) => [sig4(v), ...residuals.map((r) => sig4(r[j] * 1000))]),
  };
  const save: ChartDownload | undefined = download ? { name: download, kind: 'residuals', title: `${download}: residuals` } : undefined;
  return (
    <ChartFrame height={height} testID={testID} legend={legend} download={save} name={`${download ? `${download}: ` : ''}residuals (measured minus model current) against voltage`} table={table}>
      {(width) => (
        <VictoryChart width={width} height={height} padding={chartStyle.padding} domain={domain}>
          <VictoryAxis {...AXES.x} label="Voltage (V)" style={chartStyle.axis} tickFormat={tick} tickCount={6} />
          <VictoryAxis dependentAxis {...AXES.y} label="Residual (mA)" style={chartStyle.axis} tickFormat={tick} tickCount={5} />
          <VictoryLine data={[{ x: domain.x[0], y: 0 }, { x: domain.x[1], y: 0 }]} style={{ data: { stroke: theme.color.muted, strokeWidth: 1 } }} />
          {sets.map((data, k) => (
            <VictoryScatter key={labels[k]} data={data} size={2.5} symbol={k === 0 ? 'circle' : 'diamond'} style={{ data: { fill: COLOURS[k % 2] } }} />
          ))}
        </VictoryChart>
      )}
    </ChartFrame>
  );
}
