import { ScrollView, StyleSheet, View } from 'react-native';
import { Button } from '@/components/button';
import { FormError } from '@/components/form-error';
import { LogoMark } from '@/components/logo-mark';
import { theme } from '@/components/theme';
import { Txt } from '@/components/txt';
import type { Account } from '@/lib/api/session';
import { useAccount, useResendVerification, useSignOut } from '@/lib/api/session';

/** What a signed-in person sees who may not use the organisation's data yet, and what they can do about it. */
function explain(a: Account): { title: string; text: string } {
  switch (a.account_state) {
    case 'email_unverified':
      return {
        title: 'Confirm your e-mail address',
        text: `We sent a link to ${a.user.email}. Open it to confirm the address; until then Quasilevel shows you no data. The link is valid for 24 hours.`,
      };
    case 'awaiting_approval':
      return {
        title: 'Waiting for an administrator',
        text: `Your address is confirmed. Your request to join ${a.join_request?.organization_name ?? 'your organisation'} waits for one of its administrators, who have been told by e-mail. You will get an e-mail when they decide.`,
      };
    case 'refused':
      return { title: 'Request not approved', text: `An administrator of ${a.join_request?.organization_name ?? 'the organisation'} did not approve your request to join. Speak to them if you think this is a mistake.` };
    case 'deactivated':
      return { title: 'Account deactivated', text: `An administrator of ${a.organization?.name ?? 'your organisation'} has deactivated your account. Speak to them to have it reactivated.` };
    default:
      return { title: 'No organisation', text: 'Your account belongs to no organisation. Ask an administrator to invite this address.' };
  }
}

/** The signed-in page for an account that is not (yet) an active member: unverified, waiting, refused, deactivated or removed. */
export function AccountWaiting({ account }: { account: Account }) {
  const resend = useResendVerification();
  const signOut = useSignOut();
  const refresh = useAccount();
  const { title, text } = explain(account);
  return (
    <ScrollView style={{ flex: 1, backgroundColor: theme.color.paper }} contentContainerStyle={styles.page}>
      <View style={{ marginBottom: 20 }} role="banner">
        <LogoMark withName size={30} />
      </View>
      <View style={styles.card} testID="account-waiting" role="main">
        <Txt variant="title" testID="account-waiting-title">{title}</Txt>
        <Txt variant="body">{text}</Txt>
        {account.account_state === 'email_unverified' ? (
          <>
            {resend.isSuccess ? <Txt variant="caption" testID="verification-resent">A new link is on its way to {account.user.email}.</Txt> : null}
            <FormError error={resend.error} />
            <Button label="Send the link again" kind="secondary" onPress={() => resend.mutate(account.user.email)} busy={resend.isPending} testID="resend-verification" />
          </>
        ) : null}
        <Button label="Check again" kind="secondary" onPress={() => refresh.refetch()} busy={refresh.isFetching} testID="account-refresh" />
        <FormError error={signOut.error} />
        <Button label="Sign out" kind="quiet" onPress={() => signOut.mutate()} busy={signOut.isPending} testID="sign-out" />
      </View>
    </ScrollView>
  );
}

const styles = StyleSheet.create({
  page: { flexGrow: 1, justifyContent: 'center', alignItems: 'center', padding: 20 },
  card: {
    width: '100%',
    maxWidth: 480,
    backgroundColor: theme.color.surface,
    borderRadius: theme.radius.l,
    borderWidth: 1,
    borderColor: theme.color.line,
    padding: 22,
    gap: 14,
  },
});
