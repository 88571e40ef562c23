import { View } from 'react-native';
import { theme } from '@/components/theme';
import { Txt } from '@/components/txt';

const LOOK: Record<string, { label: string; bg: string; fg: string }> = {
  open: { label: 'Open', bg: theme.color.sunken, fg: theme.color.inkSoft },
  in_review: { label: 'In review', bg: theme.color.electronSoft, fg: theme.color.electron },
  released: { label: 'Released', bg: theme.color.okSoft, fg: theme.color.ok },
  on_hold: { label: 'On hold', bg: theme.color.dangerSoft, fg: theme.color.danger },
  archived: { label: 'Archived', bg: theme.color.sunken, fg: theme.color.muted },
};

/** A batch's release state as a label. */
export function StateBadge({ state }: { state: string }) {
  const l = LOOK[state] ?? LOOK.open;
  return (
    <View style={{ backgroundColor: l.bg, borderRadius: 999, paddingHorizontal: 10, paddingVertical: 2, alignSelf: 'flex-start' }} testID={`state-${state}`}>
      <Txt variant="caption" style={{ color: l.fg, fontFamily: theme.font.medium }}>{l.label}</Txt>
    </View>
  );
}
