import { Pressable, StyleSheet, View } from 'react-native';
import { theme } from '@/components/theme';
import { Txt } from '@/components/txt';

/** A row of mutually exclusive chips (doping type, temperature unit, translation method). */
export function PhysicsChoice<T extends string>({
  label,
  value,
  options,
  onChange,
  testID,
}: {
  label: string;
  value: T;
  options: { value: T; label: string }[];
  onChange: (v: T) => void;
  testID?: string;
}) {
  return (
    <View style={{ gap: 4 }}>
      <Txt variant="label">{label}</Txt>
      <View style={styles.row} accessibilityRole="radiogroup" accessibilityLabel={label}>
        {options.map((o) => {
          const on = value === o.value;
          return (
            <Pressable
              key={o.value}
              onPress={() => onChange(o.value)}
              accessibilityRole="radio"
              aria-checked={on}
              style={[styles.opt, on && styles.optOn]}
              testID={testID ? `${testID}-${o.value}` : undefined}
            >
              <Txt variant="label" style={{ color: on ? '#fff' : theme.color.inkSoft, flexShrink: 1 }}>{o.label}</Txt>
            </Pressable>
          );
        })}
      </View>
    </View>
  );
}

const styles = StyleSheet.create({
  row: { flexDirection: 'row', flexWrap: 'wrap', gap: 6 },
  // A long choice (a batch name) wraps inside its chip instead of running off a phone's screen.
  opt: { maxWidth: '100%', minHeight: 36, justifyContent: 'center', paddingHorizontal: 12, borderRadius: 999, borderWidth: 1, borderColor: theme.color.line, backgroundColor: theme.color.surface },
  optOn: { backgroundColor: theme.color.ink, borderColor: theme.color.ink },
});
