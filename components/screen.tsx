import { ScrollView, StyleSheet, View, useWindowDimensions } from 'react-native';
import type { TextStyle } from 'react-native';
import type { ReactNode } from 'react';
import { theme } from '@/components/theme';
import { Txt } from '@/components/txt';

/** A long name without spaces (a batch or device id) wraps rather than running off a phone's screen (web only). */
const breakAnywhere = { overflowWrap: 'anywhere' } as unknown as TextStyle;

/**
 * A scrolling page with a title row; content is capped in width on very wide screens. The
 * actions wrap below the title when they do not fit beside it, and never get wider than the page.
 */
export function Screen({
  title,
  subtitle,
  actions,
  children,
  testID,
  maxWidth = 1400,
}: {
  title: string;
  subtitle?: string;
  actions?: ReactNode;
  children: ReactNode;
  testID?: string;
  maxWidth?: number;
}) {
  const { width } = useWindowDimensions();
  const pad = width < 600 ? 14 : 28;
  return (
    <ScrollView style={styles.scroll} contentContainerStyle={{ padding: pad, paddingBottom: 48 }} testID={testID}>
      <View style={[styles.inner, { maxWidth }]}>
        <View style={styles.head}>
          <View style={styles.titles}>
            <Txt variant="title" accessibilityRole="header" style={breakAnywhere}>
              {title}
            </Txt>
            {subtitle ? <Txt variant="caption" style={breakAnywhere}>{subtitle}</Txt> : null}
          </View>
          {actions ? <View style={styles.actions}>{actions}</View> : null}
        </View>
        {children}
      </View>
    </ScrollView>
  );
}

const styles = StyleSheet.create({
  scroll: { flex: 1, backgroundColor: theme.color.paper },
  inner: { width: '100%', alignSelf: 'center', gap: 16 },
  head: { flexDirection: 'row', flexWrap: 'wrap', alignItems: 'flex-end', justifyContent: 'space-between', gap: 12 },
  titles: { flexShrink: 1, minWidth: 200, gap: 2 },
  actions: { flexDirection: 'row', flexWrap: 'wrap', gap: 8, maxWidth: '100%', flexShrink: 1 },
});
