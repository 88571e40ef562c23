import { ActivityIndicator, Pressable, StyleSheet } from 'react-native';
import type { PressableProps } from 'react-native';
import { theme } from '@/components/theme';
import { Txt } from '@/components/txt';

type Kind = 'primary' | 'secondary' | 'danger' | 'quiet';

/** A labelled button; shows a spinner and ignores presses while `busy`. */
export function Button({
  label,
  kind = 'primary',
  busy = false,
  disabled,
  ...rest
}: Omit<PressableProps, 'children'> & { label: string; kind?: Kind; busy?: boolean }) {
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
      <Txt variant="label" style={[styles.text, (kind === 'primary' || kind === 'danger') && styles.textOnDark]}>
        {label}
      </Txt>
    </Pressable>
  );
}

const styles = StyleSheet.create({
  base: {
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
  text: { fontSize: 14, color: theme.color.ink },
  textOnDark: { color: '#FFFFFF' },
});
