import { ActivityIndicator, Pressable, StyleSheet } from 'react-native';
import type { PressableProps } from 'react-native';
import { theme } from '@/components/theme';
import { Txt } from '@/components/txt';

type Kind = 'primary' | 'secondary' | 'danger' | 'quiet';

/**
 * A labelled button; shows a spinner and ignores presses while `busy`. It never grows wider than
 * the space it is given: a long label wraps (or, with `numberOfLines`, ends in an ellipsis), so
 * no button runs off a phone's screen.
 */
export function Button({
  label,
  kind = 'primary',
  busy = false,
  disabled,
  numberOfLines,
  ...rest
}: Omit<PressableProps, 'children'> & { label: string; kind?: Kind; busy?: boolean; /** Cut a long label (a batch's name) to this many lines with an ellipsis. */ numberOfLines?: number }) {
  const off = disabled || busy;
  return (
    <Pressable
      accessibilityRole="button"
      accessibilityState={{ disabled: !!off, busy }}
      disabled={off}
      style={({ pressed }) => [styles.base, styles[kind], off && styles.off, pressed && styles.pressed]}
      {...rest}
    >
      {busy ? <ActivityIndicator size="small" color={kind === 'primary' || kind === 'danger' ? '#fff' : theme.color.ink} /> : null}
      <Txt variant="label" numberOfLines={numberOfLines} style={[styles.text, (kind === 'primary' || kind === 'danger') && styles.textOnDark]}>
        {label}
      </Txt>
    </Pressable>
  );
}

const styles = StyleSheet.create({
  base: {
    maxWidth: '100%',
    flexShrink: 1,
    minHeight: 40,
    paddingHorizontal: 16,
    paddingVertical: 9,
    borderRadius: theme.radius.m,
    flexDirection: 'row',
    alignItems: 'center',
    justifyContent: 'center',
    gap: 8,
    borderWidth: 1,
    borderColor: 'transparent',
  },
  primary: { backgroundColor: theme.color.electron },
  secondary: { backgroundColor: theme.color.surface, borderColor: theme.color.line },
  danger: { backgroundColor: theme.color.danger },
  quiet: { backgroundColor: 'transparent' },
  off: { opacity: 0.5 },
  pressed: { opacity: 0.85 },
  text: { fontSize: 14, color: theme.color.ink, flexShrink: 1, textAlign: 'center' },
  textOnDark: { color: '#FFFFFF' },
});
