import { View } from 'react-native';
import { theme } from '@/components/theme';
import { Txt } from '@/components/txt';

/** Why nothing was sized, in the form's words; no figure is shown with it. */
export function SizingError({ message }: { message: string }) {
  return (
    <View
      accessibilityRole="alert"
      testID="form-error"
      style={{ backgroundColor: theme.color.dangerSoft, borderColor: theme.color.danger, borderWidth: 1, borderRadius: theme.radius.m, padding: 12, gap: 4 }}
    >
      <Txt variant="label" style={{ color: theme.color.danger }}>Nothing was sized</Txt>
      <Txt variant="body" style={{ color: theme.color.danger }}>{message}</Txt>
    </View>
  );
}
