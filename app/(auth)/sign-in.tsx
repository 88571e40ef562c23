import { zodResolver } from '@hookform/resolvers/zod';
import { Link, useLocalSearchParams } from 'expo-router';
import { useForm } from 'react-hook-form';
import { View } from 'react-native';
import { Button } from '@/components/button';
import { FormError } from '@/components/form-error';
import { TextField } from '@/components/text-field';
import { theme } from '@/components/theme';
import { Txt } from '@/components/txt';
import { useSignIn } from '@/lib/api/session';
import { signInSchema } from '@/lib/schemas/auth';
import type { SignInInput } from '@/lib/schemas/auth';

/** The message of a verification link that landed here (better-auth appends `error` when it failed). */
function verificationNote(verified?: string, error?: string): { text: string; ok: boolean } | null {
  if (!verified) return null;
  if (error === 'TOKEN_EXPIRED') return { text: 'This confirmation link has expired. Sign in and ask for a new one.', ok: false };
  if (error) return { text: 'This confirmation link is not valid (it may have been cut or used). Sign in and ask for a new one.', ok: false };
  return { text: 'Your e-mail address is confirmed. Sign in to continue.', ok: true };
}

export default function SignIn() {
  const { verified, error } = useLocalSearchParams<{ verified?: string; error?: string }>();
  const note = verificationNote(verified, error);
  const signIn = useSignIn();
  const { control, handleSubmit } = useForm<SignInInput>({ resolver: zodResolver(signInSchema), defaultValues: { email: '', password: '' } });
  const submit = handleSubmit((v) => signIn.mutate(v));
  return (
    <View style={{ gap: 14 }} testID="sign-in-form">
      <Txt variant="title">Sign in</Txt>
      {note ? (
        <View
          testID="verification-note"
          style={{ borderWidth: 1, borderRadius: theme.radius.m, padding: 10, borderColor: note.ok ? theme.color.ok : theme.color.danger, backgroundColor: note.ok ? theme.color.okSoft : theme.color.dangerSoft }}
        >
          <Txt variant="body" style={{ color: note.ok ? theme.color.ok : theme.color.danger }}>{note.text}</Txt>
        </View>
      ) : null}
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
