import { useState } from 'react';
import { StyleSheet, View } from 'react-native';
import { Button } from '@/components/button';
import { FormError } from '@/components/form-error';
import { RolePicker } from '@/components/role-picker';
import { theme } from '@/components/theme';
import { Txt } from '@/components/txt';
import { ROLE_LABELS } from '@/lib/auth/roles';
import type { Role } from '@/lib/auth/roles';
import { useChangeRole, useRemoveMember, useSetMemberActive } from '@/lib/api/users';
import type { OrgUser } from '@/lib/api/users';

type Pending = { kind: 'role'; role: Role } | { kind: 'remove' } | null;

/**
 * One member with their role chips and actions. A role change and a removal ask first, naming the
 * person (and both roles); deactivation is undone by reactivation, so it does not ask.
 */
export function MemberRow({ u, isSelf, narrow }: { u: OrgUser; isSelf: boolean; narrow: boolean }) {
  const [pending, setPending] = useState<Pending>(null);
  const change = useChangeRole();
  const active = useSetMemberActive();
  const remove = useRemoveMember();
  const busy = change.isPending || active.isPending || remove.isPending;
  const confirm = () => {
    if (pending?.kind === 'role') change.mutate({ userId: u.id, role: pending.role }, { onSuccess: () => setPending(null) });
    if (pending?.kind === 'remove') remove.mutate(u.id, { onSuccess: () => setPending(null) });
  };
  return (
    <View style={styles.row} testID={`user-${u.email}`}>
      <View style={[styles.line, narrow && { flexDirection: 'column', alignItems: 'flex-start' }]}>
        <View style={{ flex: 1, minWidth: 0 }}>
          <Txt variant="body" numberOfLines={1}>
            {u.name}
            {isSelf ? ' (you)' : ''}
            {u.active ? '' : ' · deactivated'}
          </Txt>
          <Txt variant="caption" numberOfLines={1}>{u.email}</Txt>
        </View>
        <RolePicker value={u.role} label={`Role of ${u.name}`} disabled={busy || !u.active} onChange={(role) => setPending({ kind: 'role', role })} testID={`role-${u.email}`} />
      </View>
      {pending ? (
        <View style={styles.confirm} testID="confirm-change" accessibilityRole="alert">
          <Txt variant="body">
            {pending.kind === 'role'
              ? `Change the role of ${u.name} from ${ROLE_LABELS[u.role]} to ${ROLE_LABELS[pending.role]}?`
              : `Remove ${u.name} (${ROLE_LABELS[u.role]}) from the organisation? They keep their account but see nothing of it; you can invite them again.`}
          </Txt>
          <View style={styles.buttons}>
            <Button label={pending.kind === 'role' ? 'Change role' : 'Remove'} kind={pending.kind === 'remove' ? 'danger' : 'primary'} onPress={confirm} busy={busy} testID="confirm-yes" />
            <Button label="Cancel" kind="secondary" onPress={() => setPending(null)} disabled={busy} testID="confirm-no" />
          </View>
        </View>
      ) : null}
      <FormError error={change.error ?? active.error ?? remove.error} />
      {!isSelf ? (
        <View style={styles.buttons}>
          <Button
            label={u.active ? 'Deactivate' : 'Reactivate'}
            kind="quiet"
            onPress={() => active.mutate({ userId: u.id, active: !u.active })}
            busy={active.isPending}
            disabled={busy}
            testID={`${u.active ? 'deactivate' : 'reactivate'}-${u.email}`}
          />
          <Button label="Remove" kind="quiet" onPress={() => setPending({ kind: 'remove' })} disabled={busy} testID={`remove-${u.email}`} />
        </View>
      ) : null}
    </View>
  );
}

const styles = StyleSheet.create({
  row: { gap: 8, paddingVertical: 10, borderBottomWidth: 1, borderBottomColor: theme.color.sunken },
  line: { flexDirection: 'row', alignItems: 'center', gap: 12 },
  confirm: { gap: 10, padding: 12, borderRadius: theme.radius.m, borderWidth: 1, borderColor: theme.color.hole, backgroundColor: theme.color.holeSoft },
  buttons: { flexDirection: 'row', flexWrap: 'wrap', gap: 8 },
});
