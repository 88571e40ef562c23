import { View } from 'react-native';
import { theme } from '@/components/theme';
import { Txt } from '@/components/txt';
import type { Flag } from '@/lib/iv/types';

const TONE = {
  fail: { bg: theme.color.dangerSoft, fg: theme.color.danger },
  warn: { bg: theme.color.holeSoft, fg: '#7A4E00' },
  info: { bg: theme.color.sunken, fg: theme.color.inkSoft },
} as const;

/** A curve flag as a small coloured label (its code); the sentence lives on the curve page. */
export function FlagChip({ flag }: { flag: Pick<Flag, 'code' | 'severity'> }) {
  const t = TONE[flag.severity] ?? TONE.info;
  return (
    <View style={{ backgroundColor: t.bg, borderRadius: 4, paddingHorizontal: 6, paddingVertical: 1, alignSelf: 'flex-start' }}>
      <Txt variant="caption" style={{ color: t.fg, fontSize: 11 }}>
        {flag.code}
      </Txt>
    </View>
  );
}
