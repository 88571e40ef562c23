import { zodResolver } from '@hookform/resolvers/zod';
import { Controller, useForm } from 'react-hook-form';
import { StyleSheet, View } from 'react-native';
import { Button } from '@/components/button';
import { Card } from '@/components/card';
import { FormError } from '@/components/form-error';
import { QueryState } from '@/components/query-state';
import { RolePicker } from '@/components/role-picker';
import { TextField } from '@/components/text-field';
import { theme } from '@/components/theme';
import { Txt } from '@/components/txt';
import { ROLE_LABELS } from '@/lib/auth/roles';
import { useCancelInvitation, useInvitations, useInvite } from '@/lib/api/users';
import { inviteSchema } from '@/lib/schemas/auth';
import type { InviteInput } from '@/lib/schemas/auth';
import { formatDateTime } from '@/lib/format';

/** Invite an address with a role; the pending invitations with a way to withdraw each. */
export function InvitePanel() {
  const invite = useInvite();
  const cancel = useCancelInvitation();
  const invitations = useInvitations();
  const { control, handleSubmit, reset } = useForm<InviteInput>({ resolver: zodResolver(inviteSchema), defaultValues: { email: '', role: 'test_engineer' } });
  const submit = handleSubmit((v) => invite.mutate(v, { onSuccess: () => reset({ email: '', role: v.role }) }));
  return (
    <Card title="Invite someone" testID="invite-panel">
      <Txt variant="caption">They join with this role as soon as they confirm the address, whatever its domain. Invitations last 7 days.</Txt>
      <TextField control={control} name="email" label="E-mail" keyboardType="email-address" autoCapitalize="none" autoComplete="off" testID="invite-email" />
      <Controller control={control} name="role" render={({ field }) => <RolePicker value={field.value} onChange={field.onChange} label="Role of the invited person" testID="invite-role" />} />
      <FormError error={invite.error} />
      {invite.isSuccess ? <Txt variant="caption" testID="invite-sent">Invitation sent.</Txt> : null}
      <Button label="Send invitation" onPress={submit} busy={invite.isPending} testID="invite-submit" />
      <QueryState query={invitations} isEmpty={(d) => d.invitations.length === 0} empty={<Txt variant="caption">No pending invitations.</Txt>}>
        {(d) => (
          <View>
            {d.invitations.map((i) => (
              <View key={i.id} style={styles.row} testID={`invitation-${i.email}`}>
                <View style={{ flex: 1, minWidth: 0 }}>
                  <Txt variant="body" numberOfLines={1}>{i.email}</Txt>
                  <Txt variant="caption">
                    {ROLE_LABELS[i.role]} · until {formatDateTime(i.expires_at)}
                    {i.invited_by ? ` · by ${i.invited_by}` : ''}
                  </Txt>
                </View>
                <Button label="Withdraw" kind="quiet" onPress={() => cancel.mutate(i.id)} disabled={cancel.isPending} testID={`withdraw-${i.email}`} />
              </View>
            ))}
            <FormError error={cancel.error} />
          </View>
        )}
      </QueryState>
    </Card>
  );
}

const styles = StyleSheet.create({
  row: { flexDirection: 'row', alignItems: 'center', gap: 8, paddingVertical: 8, borderTopWidth: 1, borderTopColor: theme.color.sunken },
});
