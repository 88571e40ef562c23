import { View } from 'react-native';
import { Txt } from '@/components/txt';
import type { LegendItem, LegendMark } from '@/lib/charts/svg-file';

function Mark({ mark, colour }: { mark: LegendMark; colour: string }) {
  switch (mark) {
    case 'dot':
      return <View style={{ width: 7, height: 7, borderRadius: 4, backgroundColor: colour, marginHorizontal: 5 }} />;
    case 'diamond':
      return <View style={{ width: 8, height: 8, backgroundColor: colour, transform: [{ rotate: '45deg' }], marginHorizontal: 5 }} />;
    case 'dash':
      return (
        <View style={{ flexDirection: 'row', gap: 3, width: 17 }}>
          {[0, 1, 2].map((k) => <View key={k} style={{ width: 4, height: 2, backgroundColor: colour }} />)}
        </View>
      );
    default:
      return <View style={{ width: 17, height: 2, backgroundColor: colour }} />;
  }
}

/** The chart's key: each series' mark drawn in the series' own colour, then its name. */
export function ChartLegend({ items, testID }: { items: readonly LegendItem[]; testID?: string }) {
  if (!items.length) return null;
  return (
    <View style={{ flexDirection: 'row', flexWrap: 'wrap', columnGap: 14, rowGap: 2 }} testID={testID}>
      {items.map((it) => (
        <View key={it.label} style={{ flexDirection: 'row', alignItems: 'center', gap: 5 }}>
          <Mark mark={it.mark} colour={it.colour} />
          <Txt variant="caption">{it.label}</Txt>
        </View>
      ))}
    </View>
  );
}
