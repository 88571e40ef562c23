import { Pressable, StyleSheet, TextInput, View } from 'react-native';
import { theme } from '@/components/theme';
import { Txt } from '@/components/txt';

/**
 * A number field with − and + buttons big enough for a thumb: the buttons call `onStep(±1)`
 * (the screen decides what a step is: 5 K, or the next 1-2-5 value of a density), the field
 * takes typed values such as "1e16". `note` shows under the field (the value in words, or why
 * it is not accepted when `error` is set).
 */
export function PhysicsStepper({
  label,
  unit,
  value,
  onChangeText,
  onStep,
  note,
  error,
  testID,
}: {
  label: string;
  unit: string;
  value: string;
  onChangeText: (text: string) => void;
  onStep: (direction: -1 | 1) => void;
  note?: string;
  error?: string | null;
  testID: string;
}) {
  return (
    <View style={styles.wrap}>
      <Txt variant="label">
        {label} <Txt variant="caption">({unit})</Txt>
      </Txt>
      <View style={styles.row}>
        <Pressable onPress={() => onStep(-1)} style={({ pressed }) => [styles.btn, pressed && styles.pressed]} accessibilityRole="button" accessibilityLabel={`${label}: less`} testID={`${testID}-down`}>
          <Txt variant="heading" style={styles.btnText}>−</Txt>
        </Pressable>
        <TextInput
          value={value}
          onChangeText={onChangeText}
          inputMode="decimal"
          keyboardType="numbers-and-punctuation"
          autoCapitalize="none"
          autoCorrect={false}
          accessibilityLabel={`${label} (${unit})`}
          style={[styles.input, error ? styles.inputError : null]}
          testID={`${testID}-input`}
        />
        <Pressable onPress={() => onStep(1)} style={({ pressed }) => [styles.btn, pressed && styles.pressed]} accessibilityRole="button" accessibilityLabel={`${label}: more`} testID={`${testID}-up`}>
          <Txt variant="heading" style={styles.btnText}>+</Txt>
        </Pressable>
      </View>
      {error ? (
        <Txt variant="caption" style={{ color: theme.color.danger }} accessibilityRole="alert" testID={`${testID}-error`}>
          {error}
        </Txt>
      ) : note ? (
        <Txt variant="caption">{note}</Txt>
      ) : null}
    </View>
  );
}

const styles = StyleSheet.create({
  wrap: { gap: 4, minWidth: 0 },
  row: { flexDirection: 'row', alignItems: 'stretch', gap: 6 },
  btn: {
    width: 44,
    minHeight: 44,
    borderRadius: theme.radius.m,
    borderWidth: 1,
    borderColor: theme.color.line,
    backgroundColor: theme.color.sunken,
    alignItems: 'center',
    justifyContent: 'center',
  },
  pressed: { opacity: 0.7 },
  btnText: { fontSize: 20, lineHeight: 24 },
  input: {
    flex: 1,
    minWidth: 0,
    minHeight: 44,
    fontFamily: theme.font.mono,
    fontSize: 15,
    color: theme.color.ink,
    backgroundColor: theme.color.surface,
    borderWidth: 1,
    borderColor: theme.color.line,
    borderRadius: theme.radius.m,
    paddingHorizontal: 10,
    textAlign: 'center',
  },
  inputError: { borderColor: theme.color.danger },
});
