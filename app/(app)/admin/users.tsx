import { View, useWindowDimensions } from 'react-native';
import { AuditList } from '@/components/audit-list';
import { Card } from '@/components/card';
import { InvitePanel } from '@/components/invite-panel';
import { JoinRequests } from '@/components/join-requests';
import { JoinSetting } from '@/components/join-setting';
import { MemberRow } from '@/components/member-row';
import { ReleaseDutiesSetting } from '@/components/release-duties-setting';
import { RetentionSetting } from '@/components/retention-setting';
import { QueryState } from '@/components/query-state';
import { Screen } from '@/components/screen';
import { theme } from '@/components/theme';
import { useMe } from '@/lib/api/session';
import { useUsers } from '@/lib/api/users';

/** Administrators: members and roles, requests to join, invitations, the joining and release settings and the record of changes. */
export default function UsersScreen() {
  const users = useUsers();
  const me = useMe();
  const { width } = useWindowDimensions();
  const wide = width >= theme.wideFrom;
  const members = (
    <Card title="Members">
      <QueryState query={users} isEmpty={(d) => d.users.length === 0} empty="No users yet.">
        {(d) => d.users.map((u) => <MemberRow key={u.id} u={u} isSelf={u.id === me.data?.user.id} narrow={width < 700} />)}
      </QueryState>
    </Card>
  );
  const side = (
    <>
      <JoinRequests />
      <InvitePanel />
      <JoinSetting />
      <ReleaseDutiesSetting />
      <RetentionSetting />
    </>
  );
  return (
    <Screen title="Users & roles" subtitle={`Everyone in ${me.data?.organization.name ?? 'your organisation'}, who asks to join, who is invited, and every change.`} testID="users-screen">
      {wide ? (
        <View style={{ flexDirection: 'row', gap: 16, alignItems: 'flex-start' }}>
          <View style={{ flex: 3, gap: 16, minWidth: 0 }}>
            {members}
            <AuditList />
          </View>
          <View style={{ flex: 2, gap: 16, minWidth: 0 }}>{side}</View>
        </View>
      ) : (
        <View style={{ gap: 16 }}>
          {side}
          {members}
          <AuditList />
        </View>
      )}
    </Screen>
  );
}
