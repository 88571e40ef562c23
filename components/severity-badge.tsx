import { View } from 'react-native';
import { theme } from '@/components/theme';
import { Txt } from '@/components/txt';
import { SEVERITY_WORDS } from '@/lib/quality/severity';
import type { Severity } from '@/lib/quality/severity';

/** Failing in the danger colour, warnings in amber, passing in green: the overlay chart's colours. */
export const SEVERITY_LOOK: Record<Severity, { bg: string; fg: string }> = {
  pass: { bg: theme.color.okSoft, fg: theme.color.ok },
  warn: { bg: theme.color.holeSoft, fg: '#7A4E00' },
  fail: { bg: theme.color.dangerSoft, fg: theme.color.danger },
};

/** A device's result in a word: Pass, Warning or Fail (lib/quality/severity.ts). */
export function SeverityBadge({ severity, testID }: { severity: Severity; testID?: string }) {
  const l = SEVERITY_LOOK[severity];
  return (
    <View style={{ backgroundColor: l.bg, borderRadius: 999, paddingHorizontal: 8, paddingVertical: 1, alignSelf: 'flex-start' }} testID={testID}>
      <Txt variant="caption" style={{ color: l.fg, fontFamily: theme.font.medium }}>
        {SEVERITY_WORDS[severity]}
      </Txt>
    </View>
  );
}
