import { StyleSheet, TextInput, View } from 'react-native';
import { theme } from '@/components/theme';
import { Txt } from '@/components/txt';

function End({ label, value, onChange, error, placeholder, testID }: { label: string; value: string; onChange: (t: string) => void; error?: string; placeholder: string; testID: string }) {
  return (
    <View style={styles.end}>
      <Txt variant="label">{label}</Txt>
      <TextInput
        value={value}
        onChangeText={onChange}
        inputMode="decimal"
        keyboardType="numbers-and-punctuation"
        autoCapitalize="none"
        autoCorrect={false}
        accessibilityLabel={label}
        placeholder={placeholder}
        placeholderTextColor={theme.color.muted}
        style={[styles.input, error ? styles.inputError : null]}
        testID={testID}
      />
      {error ? (
        <Txt variant="caption" style={{ color: theme.color.danger }} accessibilityRole="alert" testID={`${testID}-error`}>
          {error}
        </Txt>
      ) : null}
    </View>
  );
}

/**
 * The "from … to …" range of a chart's axis, each end a field with its own error (a range
 * upside down is said at "To"). Empty ends mean the chart's default, shown as the placeholder.
 */
export function PhysicsRange({
  unit,
  from,
  to,
  onFrom,
  onTo,
  errors,
  defaults,
  testID,
}: {
  unit: string;
  from: string;
  to: string;
  onFrom: (t: string) => void;
  onTo: (t: string) => void;
  errors: { from?: string; to?: string };
  defaults: { from: number; to: number };
  testID: string;
}) {
  return (
    <View style={styles.row} testID={testID}>
      <End label={`From (${unit})`} value={from} onChange={onFrom} error={errors.from} placeholder={String(defaults.from)} testID={`${testID}-from`} />
      <End label={`To (${unit})`} value={to} onChange={onTo} error={errors.to} placeholder={String(defaults.to)} testID={`${testID}-to`} />
    </View>
  );
}

const styles = StyleSheet.create({
  row: { flexDirection: 'row', flexWrap: 'wrap', gap: 10, alignItems: 'flex-start' },
  end: { flexGrow: 1, flexBasis: 120, minWidth: 0, gap: 4 },
  input: {
    minHeight: 44,
    fontFamily: theme.font.mono,
    fontSize: 15,
    color: theme.color.ink,
    backgroundColor: theme.color.surface,
    borderWidth: 1,
    borderColor: theme.color.line,
    borderRadius: theme.radius.m,
    paddingHorizontal: 10,
  },
  inputError: { borderColor: theme.color.danger },
});
