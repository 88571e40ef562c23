import { useRouter } from 'expo-router';
import { View } from 'react-native';
import { Button } from '@/components/button';
import { Card } from '@/components/card';
import { FormError } from '@/components/form-error';
import { Screen } from '@/components/screen';
import { Txt } from '@/components/txt';
import { ROLE_LABELS } from '@/lib/auth/roles';
import { useMe, useSignOut } from '@/lib/api/session';

export default function AccountScreen() {
  const me = useMe();
  const signOut = useSignOut();
  const router = useRouter();
  const d = me.data;
  if (!d) return null;
  return (
    <Screen title="Account" testID="account-screen">
      <Card title={d.user.name}>
        <View style={{ gap: 4 }}>
          <Txt variant="body">{d.user.email}</Txt>
          <Txt variant="label" testID="account-role">{ROLE_LABELS[d.role]}</Txt>
          <Txt variant="caption">{d.organization.name} · {d.organization.domain}</Txt>
        </View>
        <FormError error={signOut.error} />
        <Button label="Sign out" kind="secondary" onPress={() => signOut.mutate(undefined, { onSuccess: () => router.replace('/sign-in') })} busy={signOut.isPending} testID="sign-out" />
      </Card>
    </Screen>
  );
}
