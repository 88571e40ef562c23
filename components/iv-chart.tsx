import { VictoryAxis, VictoryChart, VictoryLine, VictoryScatter } from 'victory-native';
import { ChartFrame } from '@/components/chart-frame';
import type { ChartDownload } from '@/components/chart-frame';
import { ChartPointer } from '@/components/chart-pointer';
import { chartStyle, tick } from '@/components/chart-style';
import { domainOf, edgeAxes } from '@/lib/charts/plot-frame';
import { ivReadout, sig4 } from '@/lib/charts/readout';
import type { LegendItem } from '@/lib/charts/svg-file';

export type Series = { voltage_v: number[]; current_a: number[] };

/** Names of the series in the legend; a chart without a series leaves its entry out. */
export type IvLegendLabels = { measured?: string; model?: string; second?: string; mpp?: string };

const AXES = edgeAxes(chartStyle.padding);

/**
 * The measured points and fitted model(s) as an I-V or a P-V chart, with the maximum power
 * point marked. Measurements are dots; the model lines are drawn over them so a fit that misses
 * is visible; the pointer reads the nearest measured point's V, I and P. With `download` (a
 * device id), the chart can be saved as `<device>-iv.svg` / `-pv.svg` (or PNG) on the web.
 */
export function IvChart({
  measured,
  model,
  second,
  mpp,
  mode,
  labels,
  download,
  height = 260,
  testID,
}: {
  measured: Series;
  model?: Series | null;
  second?: Series | null;
  mpp?: { v: number; i: number } | null;
  mode: 'iv' | 'pv';
  labels?: IvLegendLabels;
  download?: string;
  height?: number;
  testID?: string;
}) {
  const y = (v: number, i: number) => (mode === 'iv' ? i : v * i);
  const pts = (s: Series) => s.voltage_v.map((v, k) => ({ x: v, y: y(v, s.current_a[k]) }));
  const dots = pts(measured);
  const modelPts = model ? pts(model) : [];
  const secondPts = second ? pts(second) : [];
  const mppPts = mpp ? [{ x: mpp.v, y: y(mpp.v, mpp.i) }] : [];
  const domain = domainOf([dots, modelPts, secondPts, mppPts]);
  const name = { measured: 'measured', model: 'single diode', second: 'double diode', mpp: 'maximum power point', ...labels };
  const legend: LegendItem[] = [
    { label: name.measured, colour: chartStyle.measured.data.fill, mark: 'dot' as const },
    ...(model ? [{ label: name.model, colour: chartStyle.model.data.stroke, mark: 'line' as const }] : []),
    ...(second ? [{ label: name.second, colour: chartStyle.second.data.stroke, mark: 'dash' as const }] : []),
    ...(mpp ? [{ label: name.mpp, colour: chartStyle.mpp.data.fill, mark: 'diamond' as const }] : []),
  ];
  const kind = mode === 'iv' ? 'I-V' : 'P-V';
  const table = {
    columns: ['Voltage (V)', 'Current (A)', 'Power (W)'],
    rows: measured.voltage_v.map((v, k) => [sig4(v), sig4(measured.current_a[k]), sig4(v * measured.current_a[k])]),
  };
  const save: ChartDownload | undefined = download ? { name: download, kind: mode, title: `${download}: ${kind} curve` } : undefined;
  return (
    <ChartFrame height={height} testID={testID} legend={legend} download={save} name={`${download ?? 'Measured'}: ${kind} curve, ${measured.voltage_v.length} measured points`} table={table}>
      {(width) => (
        <ChartPointer
          frame={{ width, height, padding: chartStyle.padding, domain }}
          points={dots}
          describe={(k) => ivReadout(measured.voltage_v[k], measured.current_a[k])}
          hint={`Point at the ${kind} chart to read V, I and P of a measured point.`}
          testID={testID}
        >
          <VictoryChart width={width} height={height} padding={chartStyle.padding} domain={domain}>
            <VictoryAxis {...AXES.x} label="Voltage (V)" style={chartStyle.axis} tickFormat={tick} tickCount={6} />
            <VictoryAxis dependentAxis {...AXES.y} label={mode === 'iv' ? 'Current (A)' : 'Power (W)'} style={chartStyle.axis} tickFormat={tick} tickCount={5} />
            <VictoryScatter data={dots} size={dots.length > 150 ? 1.5 : 2.5} style={chartStyle.measured} />
            {second ? <VictoryLine data={secondPts} style={chartStyle.second} /> : null}
            {model ? <VictoryLine data={modelPts} style={chartStyle.model} /> : null}
            {mpp ? <VictoryScatter data={mppPts} size={6} symbol="diamond" style={chartStyle.mpp} /> : null}
          </VictoryChart>
        </ChartPointer>
      )}
    </ChartFrame>
  );
}
