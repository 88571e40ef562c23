import { useEffect, useRef, useState } from 'react';
import type { ReactNode } from 'react';
import { Platform, Pressable, View } from 'react-native';
import type { LayoutChangeEvent } from 'react-native';
import { downloadChartPng, downloadChartSvg } from '@/components/chart-download';
import { ChartLegend } from '@/components/chart-legend';
import { theme } from '@/components/theme';
import { Txt } from '@/components/txt';
import { chartFileName } from '@/lib/charts/svg-file';
import type { LegendItem } from '@/lib/charts/svg-file';

/** What a chart's download is called: `<name>-<kind>.svg`, e.g. KF-C24-0001-iv.svg. */
export type ChartDownload = { name: string; kind: string; title?: string };

/** A chart's numbers as a table: column headings with units, and rows of formatted cells. */
export type ChartTable = { columns: readonly string[]; rows: readonly (readonly string[])[] };

/** Rows shown at once in the table view; a longer series says how many more there are. */
const TABLE_ROWS_SHOWN = 400;

/** The chart's numbers as an ARIA table (react-native-web renders the roles as given). */
function ChartTableView({ table, name, testID }: { table: ChartTable; name: string; testID?: string }) {
  const rows = table.rows.slice(0, TABLE_ROWS_SHOWN);
  return (
    // Focusable, so the keyboard can scroll a long table (a scrolling region must be reachable).
    <View style={tableStyles.box} testID={testID} focusable role="region" aria-label={`${name}: numbers`}>
      <View role="table" aria-label={`${name}: numbers`}>
        <View role="row" style={tableStyles.row}>
          {table.columns.map((c) => (
            <Txt key={c} variant="label" role="columnheader" style={tableStyles.cell}>{c}</Txt>
          ))}
        </View>
        {rows.map((r, k) => (
          <View key={k} role="row" style={tableStyles.row}>
            {r.map((v, j) => (
              <Txt key={j} variant="figure" role="cell" style={[tableStyles.cell, { fontSize: 13 }]}>{v}</Txt>
            ))}
          </View>
        ))}
      </View>
      {table.rows.length > rows.length ? <Txt variant="caption">…and {table.rows.length - rows.length} more rows (download the chart's data to read them all).</Txt> : null}
    </View>
  );
}

const tableStyles = {
  box: { maxHeight: 320, overflow: 'scroll', borderWidth: 1, borderColor: theme.color.line, borderRadius: theme.radius.s, padding: 6, backgroundColor: theme.color.surface },
  row: { flexDirection: 'row', gap: 12 },
  cell: { flex: 1, minWidth: 70 },
} as const;

function SaveLink({ label, onPress, testID }: { label: string; onPress: () => void; testID?: string }) {
  return (
    <Pressable accessibilityRole="button" accessibilityLabel={`Download chart as ${label}`} onPress={onPress} testID={testID} hitSlop={6}>
      <Txt variant="caption" style={{ color: theme.color.electron, textDecorationLine: 'underline' }}>{label}</Txt>
    </Pressable>
  );
}

/**
 * Measures the width it is given and renders `children(width)`; charts size themselves to it.
 * Around the chart: an optional title, the legend in the series' colours, a caption and, on the
 * web, links that save the drawn chart as SVG or PNG (with the legend drawn into the file).
 * The drawing is one figure named `name` (else the title or the download's title) for screen
 * readers; with `table`, a "Show as table" switch lays its numbers out as a table.
 */
export function ChartFrame({
  title,
  height,
  children,
  testID,
  caption,
  legend,
  download,
  name,
  table,
}: {
  title?: string;
  /** The chart's accessible name; defaults to the title or the download's title. */
  name?: string;
  /** The chart's numbers, readable as a table. */
  table?: ChartTable;
  height: number;
  children: (width: number) => ReactNode;
  testID?: string;
  caption?: string;
  legend?: readonly LegendItem[];
  download?: ChartDownload;
}) {
  const [width, setWidth] = useState(0);
  const [showTable, setShowTable] = useState(false);
  // The drawing's own parts (axes, ticks, an svg the library marks as an image without a name)
  // are not read one by one: the frame is a figure named by `label`, and its numbers are in the
  // table. On the web every svg is hidden from assistive technology as soon as it is added: the
  // chart library may draw its svg after this frame's own render (a chart drawn in a second pass
  // was once read, unnamed, by axe), and a mutation observer's answer comes before any other task
  // can read the page. The pointer's readout beside the svg stays readable.
  useEffect(() => {
    const node = plot.current as unknown as HTMLElement | null;
    if (Platform.OS !== 'web' || !node?.querySelectorAll || typeof MutationObserver === 'undefined') return;
    const hide = () => {
      for (const svg of Array.from(node.querySelectorAll('svg:not([aria-hidden="true"])'))) svg.setAttribute('aria-hidden', 'true');
    };
    hide();
    const watch = new MutationObserver(hide);
    watch.observe(node, { childList: true, subtree: true });
    return () => watch.disconnect();
  }, []);
  const label = name ?? title ?? download?.title ?? 'Chart';
  const plot = useRef<View>(null);
  const onLayout = (e: LayoutChangeEvent) => {
    const w = Math.floor(e.nativeEvent.layout.width);
    if (Math.abs(w - width) > 2) setWidth(w);
  };
  const saving = download && Platform.OS === 'web' ? download : null;
  const save = (ext: 'svg' | 'png') => {
    if (!saving) return;
    const file = { file_name: chartFileName(saving.name, saving.kind, ext), title: saving.title, legend };
    if (ext === 'svg') downloadChartSvg(plot.current, file);
    else downloadChartPng(plot.current, file);
  };
  return (
    <View style={{ gap: 4, minWidth: 0 }} testID={testID}>
      {title || saving || table ? (
        <View style={{ flexDirection: 'row', alignItems: 'center', gap: 10 }}>
          <View style={{ flex: 1, minWidth: 0 }}>{title ? <Txt variant="label">{title}</Txt> : null}</View>
          {table ? (
            <Pressable accessibilityRole="button" aria-expanded={showTable} onPress={() => setShowTable(!showTable)} testID={testID ? `${testID}-table-toggle` : undefined} hitSlop={6}>
              <Txt variant="caption" style={{ color: theme.color.electron, textDecorationLine: 'underline' }}>{showTable ? 'Hide table' : 'Show as table'}</Txt>
            </Pressable>
          ) : null}
          {saving ? (
            <View style={{ flexDirection: 'row', alignItems: 'center', gap: 8 }}>
              <Txt variant="caption">Download</Txt>
              <SaveLink label="SVG" onPress={() => save('svg')} testID={testID ? `${testID}-svg` : undefined} />
              <SaveLink label="PNG" onPress={() => save('png')} testID={testID ? `${testID}-png` : undefined} />
            </View>
          ) : null}
        </View>
      ) : null}
      <View ref={plot} onLayout={onLayout} style={{ width: '100%', minHeight: height }} testID={testID ? `${testID}-frame` : undefined} role="figure" aria-label={label}>
        {width > 0 ? children(width) : null}
      </View>
      {table && showTable ? <ChartTableView table={table} name={label} testID={testID ? `${testID}-table` : undefined} /> : null}
      {legend ? <ChartLegend items={legend} testID={testID ? `${testID}-legend` : undefined} /> : null}
      {caption ? <Txt variant="caption">{caption}</Txt> : null}
    </View>
  );
}
