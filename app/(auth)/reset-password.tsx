import { zodResolver } from '@hookform/resolvers/zod';
import { Link, useLocalSearchParams } from 'expo-router';
import { useForm } from 'react-hook-form';
import { View } from 'react-native';
import type { z } from 'zod';
import { Button } from '@/components/button';
import { FormError } from '@/components/form-error';
import { TextField } from '@/components/text-field';
import { Txt } from '@/components/txt';
import { useResetPassword } from '@/lib/api/session';
import { PASSWORD_RULE_TEXT } from '@/lib/auth/password';
import { resetPasswordSchema } from '@/lib/schemas/auth';

export default function ResetPassword() {
  const { token, error } = useLocalSearchParams<{ token?: string; error?: string }>();
  const reset = useResetPassword();
  const { control, handleSubmit } = useForm<z.infer<typeof resetPasswordSchema>>({
    resolver: zodResolver(resetPasswordSchema),
    defaultValues: { password: '' },
  });
  const submit = handleSubmit((v) => token && reset.mutate({ token, newPassword: v.password }));
  if (!token || error) {
    return (
      <View style={{ gap: 14 }}>
        <Txt variant="title">Reset link not valid</Txt>
        <Txt variant="body">This reset link is missing, used or expired. Ask for a new one.</Txt>
        <Link href="/forgot-password">
          <Txt variant="label" style={{ textDecorationLine: 'underline' }}>Ask for a new link</Txt>
        </Link>
      </View>
    );
  }
  return (
    <View style={{ gap: 14 }}>
      <Txt variant="title">Choose a new password</Txt>
      {reset.isSuccess ? (
        <>
          <Txt variant="body">Your password is changed, and every session of your account has been signed out. Sign in with the new password.</Txt>
          <Link href="/sign-in">
            <Txt variant="label" style={{ textDecorationLine: 'underline' }}>Sign in</Txt>
          </Link>
        </>
      ) : (
        <>
          <TextField control={control} name="password" label="New password" hint={PASSWORD_RULE_TEXT} secureTextEntry autoComplete="new-password" onSubmitEditing={submit} />
          <FormError error={reset.error} />
          <Button label="Set password" onPress={submit} busy={reset.isPending} />
        </>
      )}
    </View>
  );
}
