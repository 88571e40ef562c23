import { View } from 'react-native';
import { theme } from '@/components/theme';
import { Txt } from '@/components/txt';

/** One labelled figure in the mono face, optionally with its uncertainty and a note. */
export function Figure({ label, value, plusMinus, note, testID, warn }: { label: string; value: string; plusMinus?: string | null; note?: string; testID?: string; warn?: boolean }) {
  return (
    <View style={{ minWidth: 120, flexGrow: 1, flexBasis: 120, gap: 2 }} testID={testID}>
      <Txt variant="caption">{label}</Txt>
      <Txt variant="figureLarge" style={[{ fontSize: 18, lineHeight: 24 }, warn ? { color: theme.color.danger } : null]}>
        {value}
      </Txt>
      {plusMinus ? <Txt variant="caption" style={{ fontFamily: theme.font.mono }}>± {plusMinus}</Txt> : null}
      {note ? <Txt variant="caption">{note}</Txt> : null}
    </View>
  );
}
