import { useState } from 'react';
import { StyleSheet, View } from 'react-native';
import { Button } from '@/components/button';
import { Card } from '@/components/card';
import { FormError } from '@/components/form-error';
import { QueryState } from '@/components/query-state';
import { RolePicker } from '@/components/role-picker';
import { theme } from '@/components/theme';
import { Txt } from '@/components/txt';
import { ROLE_LABELS } from '@/lib/auth/roles';
import type { Role } from '@/lib/auth/roles';
import { useDecideRequest, useJoinRequests } from '@/lib/api/users';
import type { JoinRequest } from '@/lib/api/users';
import { formatDateTime } from '@/lib/format';

/** One request: choose a role, then approve; or refuse. */
function RequestRow({ r }: { r: JoinRequest }) {
  const [role, setRole] = useState<Role>('test_engineer');
  const decide = useDecideRequest();
  return (
    <View style={styles.row} testID={`request-${r.email}`}>
      <Txt variant="body">{r.name}</Txt>
      <Txt variant="caption">
        {r.email} · asked {formatDateTime(r.created_at)}
      </Txt>
      <RolePicker value={role} onChange={setRole} label={`Role for ${r.name}`} disabled={decide.isPending} testID={`request-role-${r.email}`} />
      <FormError error={decide.error} />
      <View style={styles.buttons}>
        <Button label={`Approve as ${ROLE_LABELS[role]}`} onPress={() => decide.mutate({ id: r.id, decision: 'approve', role })} busy={decide.isPending} testID={`approve-${r.email}`} />
        <Button label="Refuse" kind="secondary" onPress={() => decide.mutate({ id: r.id, decision: 'refuse' })} disabled={decide.isPending} testID={`refuse-${r.email}`} />
      </View>
    </View>
  );
}

/** Verified newcomers of the organisation's domain who asked to join. */
export function JoinRequests() {
  const requests = useJoinRequests();
  return (
    <Card title="Requests to join" testID="join-requests">
      <QueryState query={requests} isEmpty={(d) => d.requests.length === 0} empty={<Txt variant="caption">No one is waiting.</Txt>}>
        {(d) => d.requests.map((r) => <RequestRow key={r.id} r={r} />)}
      </QueryState>
    </Card>
  );
}

const styles = StyleSheet.create({
  row: { gap: 8, paddingVertical: 10, borderBottomWidth: 1, borderBottomColor: theme.color.sunken },
  buttons: { flexDirection: 'row', flexWrap: 'wrap', gap: 8 },
});
