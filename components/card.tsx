import { StyleSheet, View } from 'react-native';
import type { ViewProps } from 'react-native';
import { theme } from '@/components/theme';
import { Txt } from '@/components/txt';

/** A white panel with an optional heading. */
export function Card({ title, children, style, ...rest }: ViewProps & { title?: string }) {
  return (
    <View style={[styles.card, style]} {...rest}>
      {title ? <Txt variant="heading">{title}</Txt> : null}
      {children}
    </View>
  );
}

const styles = StyleSheet.create({
  card: {
    backgroundColor: theme.color.surface,
    borderRadius: theme.radius.l,
    borderWidth: 1,
    borderColor: theme.color.line,
    padding: 16,
    gap: 12,
    minWidth: 0,
  },
});
