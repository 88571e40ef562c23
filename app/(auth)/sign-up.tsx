import { zodResolver } from '@hookform/resolvers/zod';
import { Link } from 'expo-router';
import { useForm } from 'react-hook-form';
import { View } from 'react-native';
import { Button } from '@/components/button';
import { FormError } from '@/components/form-error';
import { TextField } from '@/components/text-field';
import { Txt } from '@/components/txt';
import { useSignUp } from '@/lib/api/session';
import { signUpSchema } from '@/lib/schemas/auth';
import type { SignUpInput } from '@/lib/schemas/auth';

export default function SignUp() {
  const signUp = useSignUp();
  const { control, handleSubmit } = useForm<SignUpInput>({ resolver: zodResolver(signUpSchema), defaultValues: { name: '', email: '', password: '' } });
  const submit = handleSubmit((v) => signUp.mutate(v));
  return (
    <View style={{ gap: 14 }}>
      <Txt variant="title">Create an account</Txt>
      <Txt variant="caption">
        Use your work e-mail. If your company already uses Quasilevel you join it as a test engineer; an
        administrator can change your role. A new company domain starts a new organisation with you as its administrator.
      </Txt>
      <TextField control={control} name="name" label="Name" autoComplete="name" />
      <TextField control={control} name="email" label="Work e-mail" autoComplete="email" keyboardType="email-address" autoCapitalize="none" />
      <TextField control={control} name="password" label="Password" hint="At least 8 characters." secureTextEntry autoComplete="new-password" onSubmitEditing={submit} />
      <FormError error={signUp.error} />
      <Button label="Create account" onPress={submit} busy={signUp.isPending} />
      <Link href="/sign-in">
        <Txt variant="label" style={{ textDecorationLine: 'underline' }}>I already have an account</Txt>
      </Link>
    </View>
  );
}
