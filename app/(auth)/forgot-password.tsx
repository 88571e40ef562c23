import { zodResolver } from '@hookform/resolvers/zod';
import { Link } from 'expo-router';
import { useForm } from 'react-hook-form';
import { View } from 'react-native';
import type { z } from 'zod';
import { Button } from '@/components/button';
import { FormError } from '@/components/form-error';
import { TextField } from '@/components/text-field';
import { Txt } from '@/components/txt';
import { useRequestPasswordReset } from '@/lib/api/session';
import { forgotPasswordSchema } from '@/lib/schemas/auth';

export default function ForgotPassword() {
  const request = useRequestPasswordReset();
  const { control, handleSubmit } = useForm<z.infer<typeof forgotPasswordSchema>>({
    resolver: zodResolver(forgotPasswordSchema),
    defaultValues: { email: '' },
  });
  const submit = handleSubmit((v) => request.mutate(v.email));
  return (
    <View style={{ gap: 14 }}>
      <Txt variant="title">Reset your password</Txt>
      {request.isSuccess ? (
        <Txt variant="body" testID="reset-sent">
          If an account uses that address, a message with a reset link is on its way. The link works for one hour.
        </Txt>
      ) : (
        <>
          <TextField control={control} name="email" label="E-mail" autoComplete="email" keyboardType="email-address" autoCapitalize="none" onSubmitEditing={submit} />
          <FormError error={request.error} />
          <Button label="Send reset link" onPress={submit} busy={request.isPending} />
        </>
      )}
      <Link href="/sign-in">
        <Txt variant="label" style={{ textDecorationLine: 'underline' }}>Back to sign in</Txt>
      </Link>
    </View>
  );
}
