import { useState } from 'react';
import { Pressable, StyleSheet, View } from 'react-native';
import { theme } from '@/components/theme';
import { Txt } from '@/components/txt';
import { HV_CAUTION } from '@/lib/strings/cautions';

/**
 * The high-voltage caution, shown wherever module, string or test voltages appear. Compact by
 * default (one line, expandable) so it does not push the figures off a phone screen.
 */
export function CautionBlock({ expanded: startExpanded = false }: { expanded?: boolean }) {
  const [open, setOpen] = useState(startExpanded);
  return (
    <View style={styles.box} accessibilityRole="alert" testID="hv-caution">
      <View style={styles.head}>
        <View style={styles.badge}>
          <Txt variant="label" style={{ color: '#fff', fontSize: 12 }}>HV</Txt>
        </View>
        <Txt variant="label" style={{ flex: 1, color: theme.color.ink }}>{HV_CAUTION.title}</Txt>
        <Pressable onPress={() => setOpen((o) => !o)} accessibilityRole="button" testID="hv-caution-toggle">
          <Txt variant="caption" style={{ textDecorationLine: 'underline' }}>{open ? 'Less' : 'Read'}</Txt>
        </Pressable>
      </View>
      {open ? (
        <View style={{ gap: 6 }}>
          {HV_CAUTION.bullets.map((b) => (
            <Txt key={b} variant="caption" style={{ color: theme.color.inkSoft }}>
              •  {b}
            </Txt>
          ))}
        </View>
      ) : (
        <Txt variant="caption" style={{ color: theme.color.inkSoft }}>{HV_CAUTION.short}</Txt>
      )}
    </View>
  );
}

const styles = StyleSheet.create({
  box: {
    backgroundColor: theme.color.holeSoft,
    borderLeftWidth: 4,
    borderLeftColor: theme.color.hole,
    borderRadius: theme.radius.m,
    padding: 12,
    gap: 8,
  },
  head: { flexDirection: 'row', alignItems: 'center', gap: 8 },
  badge: { backgroundColor: theme.color.hole, borderRadius: 4, paddingHorizontal: 6, paddingVertical: 1 },
});
