import { createElement, useRef } from 'react';
import { Platform, Pressable, StyleSheet, View } from 'react-native';
import { Controller } from 'react-hook-form';
import type { Control, FieldValues, Path } from 'react-hook-form';
import { TextField } from '@/components/text-field';
import { theme } from '@/components/theme';
import { Txt } from '@/components/txt';

/** The part of a DOM date input this field uses (the web build only). */
type DateInput = { showPicker?: () => void; value: string };

/**
 * A calendar date bound to a react-hook-form field, written and shown as yyyy-mm-dd (ISO 8601)
 * whatever the browser's locale: a text field, and on the web a "Calendar" button that opens the
 * browser's own date picker (a hidden date input, whose value is ISO too) and writes the chosen
 * day into the field. The browser's date input itself is not shown, because it displays the
 * locale's form (11/14/2025 in an American browser).
 */
export function DateField<T extends FieldValues>({ control, name, label, hint, testID }: { control: Control<T>; name: Path<T>; label: string; hint?: string; testID?: string }) {
  const picker = useRef<DateInput | null>(null);
  if (Platform.OS !== 'web') {
    return <TextField control={control} name={name} label={label} hint={hint ?? 'yyyy-mm-dd'} placeholder="yyyy-mm-dd" autoCapitalize="none" testID={testID} />;
  }
  return (
    <Controller
      control={control}
      name={name}
      render={({ field: { onChange, onBlur, value }, fieldState: { error } }) => {
        const text = value == null ? '' : String(value);
        return (
          <View style={styles.wrap}>
            <Txt variant="label">{label}</Txt>
            <View style={styles.row}>
              {createElement('input', {
                type: 'text',
                value: text,
                onChange: (e: { target: { value: string } }) => onChange(e.target.value),
                onBlur,
                placeholder: 'yyyy-mm-dd',
                inputMode: 'numeric',
                maxLength: 10,
                autoComplete: 'off',
                'aria-label': label,
                'aria-invalid': error ? true : undefined,
                'data-testid': testID,
                style: { ...inputStyle, borderColor: error ? theme.color.danger : theme.color.line },
              })}
              {createElement('input', {
                type: 'date',
                ref: picker,
                value: /^\d{4}-\d{2}-\d{2}$/.test(text) ? text : '',
                onChange: (e: { target: { value: string } }) => onChange(e.target.value),
                min: '1900-01-01',
                max: '2999-12-31',
                tabIndex: -1,
                'aria-hidden': true,
                style: hiddenStyle,
              })}
              <Pressable
                onPress={() => picker.current?.showPicker?.()}
                style={({ pressed }) => [styles.pick, pressed && { opacity: 0.7 }]}
                accessibilityRole="button"
                accessibilityLabel={`${label}: pick from a calendar`}
                testID={testID ? `${testID}-pick` : undefined}
              >
                <Txt variant="label">Calendar</Txt>
              </Pressable>
            </View>
            {error ? (
              <Txt variant="caption" style={{ color: theme.color.danger }} accessibilityRole="alert" testID={testID ? `${testID}-error` : undefined}>
                {error.message}
              </Txt>
            ) : (
              <Txt variant="caption">{hint ? `yyyy-mm-dd. ${hint}` : 'yyyy-mm-dd'}</Txt>
            )}
          </View>
        );
      }}
    />
  );
}

/** The text fields' look, as a DOM style (these are plain elements, not TextInputs). */
const inputStyle = {
  flex: 1,
  minWidth: 0,
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
} as const;

/** Present for its picker, out of sight and out of the tab order. */
const hiddenStyle = { position: 'absolute', width: 1, height: 1, opacity: 0, pointerEvents: 'none', border: 0, padding: 0 } as const;

const styles = StyleSheet.create({
  wrap: { gap: 4 },
  row: { flexDirection: 'row', gap: 6, alignItems: 'stretch', position: 'relative' },
  pick: { paddingHorizontal: 12, minHeight: 40, justifyContent: 'center', borderRadius: theme.radius.m, borderWidth: 1, borderColor: theme.color.line, backgroundColor: theme.color.sunken },
});
