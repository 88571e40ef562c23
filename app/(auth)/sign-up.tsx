import { zodResolver } from '@hookform/resolvers/zod';
import { Link } from 'expo-router';
import { useEffect } from 'react';
import { useForm } from 'react-hook-form';
import { View } from 'react-native';
import { Button } from '@/components/button';
import { FormError } from '@/components/form-error';
import { TextField } from '@/components/text-field';
import { Txt } from '@/components/txt';
import { useSignUp } from '@/lib/api/session';
import { loadPasswordChecker, PASSWORD_RULE_TEXT } from '@/lib/auth/password';
import { signUpSchema } from '@/lib/schemas/auth';
import type { SignUpInput } from '@/lib/schemas/auth';

export default function SignUp() {
  const signUp = useSignUp();
  const { control, handleSubmit, getValues } = useForm<SignUpInput>({ resolver: zodResolver(signUpSchema), defaultValues: { name: '', email: '', password: '' } });
  // The password dictionaries load while the person types their name.
  useEffect(() => {
    loadPasswordChecker().catch(() => undefined);
  }, []);
  const submit = handleSubmit((v) => signUp.mutate(v));
  if (signUp.isSuccess) {
    return (
      <View style={{ gap: 14 }} testID="sign-up-check-mail">
        <Txt variant="title">Check your mail</Txt>
        <Txt variant="body">
          We sent a message to {getValues('email')}. Open the link in it within 24 hours to confirm the address; the link signs you in.
        </Txt>
        <Txt variant="caption">
          Nothing arrived? Look in the spam folder, or sign in and ask for a new link. If this address already has an account, the
          message says so instead.
        </Txt>
        <Link href="/sign-in">
          <Txt variant="label" style={{ textDecorationLine: 'underline' }}>Go to sign-in</Txt>
        </Link>
      </View>
    );
  }
  return (
    <View style={{ gap: 14 }} testID="sign-up-form">
      <Txt variant="title">Create an account</Txt>
      <Txt variant="caption">
        Use your work e-mail; we send a link to confirm it. If your company already uses Quasilevel, an administrator lets you in
        (or you join at once if they allow it for your domain, or invited you). A new company domain starts a new organisation with you
        as its administrator.
      </Txt>
      <TextField control={control} name="name" label="Name" autoComplete="name" testID="name" />
      <TextField control={control} name="email" label="Work e-mail" autoComplete="email" keyboardType="email-address" autoCapitalize="none" testID="email" />
      <TextField control={control} name="password" label="Password" hint={PASSWORD_RULE_TEXT} secureTextEntry autoComplete="new-password" onSubmitEditing={submit} testID="password" />
      <FormError error={signUp.error} />
      <Button label="Create account" onPress={submit} busy={signUp.isPending} testID="sign-up-submit" />
      <Link href="/sign-in">
        <Txt variant="label" style={{ textDecorationLine: 'underline' }}>I already have an account</Txt>
      </Link>
    </View>
  );
}
