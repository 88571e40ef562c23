import { createElement } from 'react';
import { Platform, StyleSheet, View } from 'react-native';
import { Controller } from 'react-hook-form';
import type { Control, FieldValues, Path } from 'react-hook-form';
import { TextField } from '@/components/text-field';
import { theme } from '@/components/theme';
import { Txt } from '@/components/txt';

/**
 * A calendar date bound to a react-hook-form field, always yyyy-mm-dd (ISO 8601). On the web it
 * is the browser's own date input (a calendar to pick from; its value is yyyy-mm-dd whatever the
 * locale shows); elsewhere a text field that says the form to type.
 */
export function DateField<T extends FieldValues>({ control, name, label, hint, testID }: { control: Control<T>; name: Path<T>; label: string; hint?: string; testID?: string }) {
  if (Platform.OS !== 'web') {
    return <TextField control={control} name={name} label={label} hint={hint ?? 'yyyy-mm-dd'} placeholder="yyyy-mm-dd" autoCapitalize="none" testID={testID} />;
  }
  return (
    <Controller
      control={control}
      name={name}
      render={({ field: { onChange, onBlur, value }, fieldState: { error } }) => (
        <View style={styles.wrap}>
          <Txt variant="label">{label}</Txt>
          {createElement('input', {
            type: 'date',
            value: value == null ? '' : String(value),
            onChange: (e: { target: { value: string } }) => onChange(e.target.value),
            onBlur,
            'aria-label': label,
            'aria-invalid': error ? true : undefined,
            'data-testid': testID,
            min: '1900-01-01',
            max: '2999-12-31',
            style: { ...inputStyle, borderColor: error ? theme.color.danger : theme.color.line },
          })}
          {error ? (
            <Txt variant="caption" style={{ color: theme.color.danger }} accessibilityRole="alert">
              {error.message}
            </Txt>
          ) : hint ? (
            <Txt variant="caption">{hint}</Txt>
          ) : null}
        </View>
      )}
    />
  );
}

/** The text fields' look, as a DOM style (the date input is a plain element, not a TextInput). */
const inputStyle = {
  fontFamily: theme.font.regular,
  fontSize: 15,
  color: theme.color.ink,
  backgroundColor: theme.color.surface,
  borderWidth: 1,
  borderStyle: 'solid',
  borderRadius: theme.radius.m,
  padding: '8px 12px',
  minHeight: 40,
  boxSizing: 'border-box',
  width: '100%',
} as const;

const styles = StyleSheet.create({
  wrap: { gap: 4 },
});
