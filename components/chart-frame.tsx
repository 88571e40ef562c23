import { useRef, useState } from 'react';
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
 */
export function ChartFrame({
  title,
  height,
  children,
  testID,
  caption,
  legend,
  download,
}: {
  title?: string;
  height: number;
  children: (width: number) => ReactNode;
  testID?: string;
  caption?: string;
  legend?: readonly LegendItem[];
  download?: ChartDownload;
}) {
  const [width, setWidth] = useState(0);
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
      {title || saving ? (
        <View style={{ flexDirection: 'row', alignItems: 'center', gap: 10 }}>
          <View style={{ flex: 1, minWidth: 0 }}>{title ? <Txt variant="label">{title}</Txt> : null}</View>
          {saving ? (
            <View style={{ flexDirection: 'row', alignItems: 'center', gap: 8 }}>
              <Txt variant="caption">Download</Txt>
              <SaveLink label="SVG" onPress={() => save('svg')} testID={testID ? `${testID}-svg` : undefined} />
              <SaveLink label="PNG" onPress={() => save('png')} testID={testID ? `${testID}-png` : undefined} />
            </View>
          ) : null}
        </View>
      ) : null}
      <View ref={plot} onLayout={onLayout} style={{ width: '100%', minHeight: height }} testID={testID ? `${testID}-frame` : undefined}>
        {width > 0 ? children(width) : null}
      </View>
      {legend ? <ChartLegend items={legend} testID={testID ? `${testID}-legend` : undefined} /> : null}
      {caption ? <Txt variant="caption">{caption}</Txt> : null}
    </View>
  );
}
