import { useId } from 'react';
import { StyleSheet, TextInput, View } from 'react-native';
import type { TextInputProps } from 'react-native';
import { Controller } from 'react-hook-form';
import type { Control, FieldValues, Path } from 'react-hook-form';
import { theme } from '@/components/theme';
import { Txt } from '@/components/txt';

/**
 * A labelled text input bound to a react-hook-form field, with its validation message (testID `<testID>-error`). The label
 * names the input (aria-labelledby), the message or hint describes it (aria-describedby), and a
 * message appears in a live region, so a screen reader reads it out when it comes.
 */
export function TextField<T extends FieldValues>({
  control,
  name,
  label,
  hint,
  ...input
}: TextInputProps & { control: Control<T>; name: Path<T>; label: string; hint?: string }) {
  const id = useId().replace(/:/g, '');
  const labelId = `${id}-label`;
  const noteId = `${id}-note`;
  return (
    <Controller
      control={control}
      name={name}
      render={({ field: { onChange, onBlur, value }, fieldState: { error } }) => (
        <View style={styles.wrap}>
          <Txt variant="label" nativeID={labelId}>{label}</Txt>
          <TextInput
            accessibilityLabel={label}
            aria-labelledby={labelId}
            aria-invalid={error ? true : undefined}
            aria-describedby={error || hint ? noteId : undefined}
            onBlur={onBlur}
            onChangeText={onChange}
            value={value == null ? '' : String(value)}
            placeholderTextColor={theme.color.muted}
            style={[styles.input, error && styles.inputError]}
            {...input}
          />
          <View accessibilityLiveRegion="polite" aria-live="polite">
            {error ? (
              <Txt variant="caption" style={styles.error} accessibilityRole="alert" nativeID={noteId} testID={input.testID ? `${input.testID}-error` : undefined}>
                {error.message}
              </Txt>
            ) : hint ? (
              <Txt variant="caption" nativeID={noteId}>{hint}</Txt>
            ) : null}
          </View>
        </View>
      )}
    />
  );
}

const styles = StyleSheet.create({
  wrap: { gap: 4 },
  input: {
    fontFamily: theme.font.regular,
    fontSize: 15,
    color: theme.color.ink,
    backgroundColor: theme.color.surface,
    borderWidth: 1,
    borderColor: theme.color.line,
    borderRadius: theme.radius.m,
    paddingHorizontal: 12,
    paddingVertical: 9,
    minHeight: 40,
  },
  inputError: { borderColor: theme.color.danger },
  error: { color: theme.color.danger },
});
