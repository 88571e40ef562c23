import { VictoryAxis, VictoryBoxPlot, VictoryChart, VictoryScatter } from 'victory-native';
import { ChartFrame } from '@/components/chart-frame';
import { chartStyle, tick } from '@/components/chart-style';
import { theme } from '@/components/theme';
import { edgeAxes } from '@/lib/charts/plot-frame';
import { sig4 } from '@/lib/charts/readout';

const PADDING = { ...chartStyle.padding, bottom: 56 };

/**
 * Tick labels with enough digits to tell ticks apart when the values sit close together
 * (Voc 20.08…20.12 V needs four digits, where the shared `tick` gives three); else `tick`.
 */
function spanTick(values: number[]): (v: number) => string {
  if (values.length < 2) return tick;
  const lo = Math.min(...values);
  const hi = Math.max(...values);
  const top = Math.max(Math.abs(lo), Math.abs(hi));
  if (!(hi > lo) || top >= 1000 || top < 0.001) return tick;
  const digits = Math.min(8, Math.max(3, Math.ceil(Math.log10(top / ((hi - lo) / 5))) + 1));
  return (v: number) => (v === 0 ? '0' : String(Number(v.toPrecision(digits))));
}

/** The middle value (mean of the two middle ones for an even count). */
const median = (v: number[]): number => {
  const s = [...v].sort((a, b) => a - b);
  const m = Math.floor(s.length / 2);
  return s.length % 2 ? s[m] : (s[m - 1] + s[m]) / 2;
};

/** The parameter's label as a file-name part: "Rs (Ω)" → "rs". */
const fileKind = (label: string) => label.replace(/\(.*\)/, '').trim().toLowerCase().replace(/[^a-z0-9]+/g, '-').replace(/^-|-$/g, '') || 'parameter';

/**
 * Box plots of one parameter for several batches on one axis (box: quartiles, whiskers: min and
 * max), with every device as a dot so small batches are not hidden behind their box.
 */
export function DistributionChart({
  groups,
  label,
  height = 260,
  testID,
  groupWord = 'Batch',
  fileName = 'comparison',
}: {
  groups: { name: string; values: number[] }[];
  label: string;
  height?: number;
  testID?: string;
  /** What a box is, for the table's first column and the chart's name ("Batch", "Temperature"). */
  groupWord?: string;
  /** The download's name part (`<fileName>-<parameter>.svg`). */
  fileName?: string;
}) {
  const data = groups.filter((g) => g.values.length > 0).map((g, k) => ({ x: k + 1, y: g.values, name: g.name }));
  const all = data.flatMap((g) => g.y);
  const tickOf = spanTick(all);
  // The axis title clears the widest tick label (mono 10 px: about 6.2 px a character).
  const widest = all.length ? Math.max(...[Math.min(...all), Math.max(...all)].map((v) => tickOf(v).length + 1)) : 4;
  const labelGap = Math.max(chartStyle.axis.axisLabel.padding, Math.ceil(widest * 6.2) + 8);
  const padding = { ...PADDING, left: Math.max(PADDING.left, labelGap + 22) };
  const axes = edgeAxes(padding);
  const dots = data.flatMap((g) => g.y.map((v, j) => ({ x: g.x + (((j * 7919) % 100) / 100 - 0.5) * 0.3, y: v })));
  return (
    <ChartFrame
      height={height}
      testID={testID}
      download={{ name: fileName, kind: fileKind(label), title: label }}
      name={`${label} by ${groupWord.toLowerCase()}: box plots with every device`}
      table={{ columns: [groupWord, 'Devices', `Minimum ${label}`, 'Median', 'Maximum'], rows: data.map((g) => [g.name, String(g.y.length), sig4(Math.min(...g.y)), sig4(median(g.y)), sig4(Math.max(...g.y))]) }}
    >
      {(width) => (
        // One box alone: its dots spread over a box's width either side, not over the whole chart.
        <VictoryChart width={width} height={height} padding={padding} domainPadding={{ x: 30 }} {...(data.length === 1 ? { domain: { x: [0.4, 1.6] as [number, number] } } : {})}>
          <VictoryAxis
            {...axes.x}
            style={{ ...chartStyle.axis, tickLabels: { ...chartStyle.axis.tickLabels, fontFamily: theme.font.regular } }}
            tickValues={data.map((d) => d.x)}
            tickFormat={(t: number) => {
              const n = data.find((d) => d.x === t)?.name ?? '';
              return n.length > 18 ? n.slice(0, 17) + '…' : n;
            }}
          />
          <VictoryAxis dependentAxis {...axes.y} label={label} style={{ ...chartStyle.axis, axisLabel: { ...chartStyle.axis.axisLabel, padding: labelGap } }} tickFormat={tickOf} tickCount={5} />
          <VictoryBoxPlot
            data={data}
            boxWidth={Math.min(40, width / (data.length * 3 + 1))}
            style={{
              q1: { fill: theme.color.electronSoft, stroke: theme.color.electron },
              q3: { fill: theme.color.electronSoft, stroke: theme.color.electron },
              median: { stroke: theme.color.ink, strokeWidth: 2 },
              min: { stroke: theme.color.inkSoft },
              max: { stroke: theme.color.inkSoft },
            }}
          />
          <VictoryScatter data={dots} size={1.8} style={{ data: { fill: theme.color.hole, opacity: 0.7 } }} />
        </VictoryChart>
      )}
    </ChartFrame>
  );
}
