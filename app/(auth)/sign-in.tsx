import { zodResolver } from '@hookform/resolvers/zod';
import { Link } from 'expo-router';
import { useForm } from 'react-hook-form';
import { View } from 'react-native';
import { Button } from '@/components/button';
import { FormError } from '@/components/form-error';
import { TextField } from '@/components/text-field';
import { Txt } from '@/components/txt';
import { useSignIn } from '@/lib/api/session';
import { signInSchema } from '@/lib/schemas/auth';
import type { SignInInput } from '@/lib/schemas/auth';

export default function SignIn() {
  const signIn = useSignIn();
  const { control, handleSubmit } = useForm<SignInInput>({ resolver: zodResolver(signInSchema), defaultValues: { email: '', password: '' } });
  const submit = handleSubmit((v) => signIn.mutate(v));
  return (
    <View style={{ gap: 14 }} testID="sign-in-form">
      <Txt variant="title">Sign in</Txt>
      <TextField control={control} name="email" label="E-mail" autoComplete="email" keyboardType="email-address" autoCapitalize="none" testID="email" />
      <TextField control={control} name="password" label="Password" secureTextEntry autoComplete="current-password" onSubmitEditing={submit} testID="password" />
      <FormError error={signIn.error} />
      <Button label="Sign in" onPress={submit} busy={signIn.isPending} testID="sign-in-submit" />
      <View style={{ flexDirection: 'row', justifyContent: 'space-between', flexWrap: 'wrap', gap: 8 }}>
        <Link href="/forgot-password">
          <Txt variant="label" style={{ textDecorationLine: 'underline' }}>Forgot password?</Txt>
        </Link>
        <Link href="/sign-up">
          <Txt variant="label" style={{ textDecorationLine: 'underline' }}>Create an account</Txt>
        </Link>
      </View>
    </View>
  );
}
