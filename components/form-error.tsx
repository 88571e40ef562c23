import { View } from 'react-native';
import { theme } from '@/components/theme';
import { Txt } from '@/components/txt';
import { toUserMessage } from '@/lib/api/client';

/** The failed request's message under a form, in a sentence; nothing when there is no error. */
export function FormError({ error }: { error: unknown }) {
  if (!error) return null;
  return (
    <View
      accessibilityRole="alert"
      testID="form-error"
      style={{ backgroundColor: theme.color.dangerSoft, borderColor: theme.color.danger, borderWidth: 1, borderRadius: theme.radius.m, padding: 10 }}
    >
      <Txt variant="body" style={{ color: theme.color.danger }}>
        {toUserMessage(error)}
      </Txt>
    </View>
  );
}
