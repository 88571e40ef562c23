import { useState } from 'react';
import { Pressable, StyleSheet, View, useWindowDimensions } from 'react-native';
import { Card } from '@/components/card';
import { FormError } from '@/components/form-error';
import { QueryState } from '@/components/query-state';
import { Screen } from '@/components/screen';
import { theme } from '@/components/theme';
import { Txt } from '@/components/txt';
import { ROLES, ROLE_LABELS } from '@/lib/auth/roles';
import type { Role } from '@/lib/auth/roles';
import { useMe } from '@/lib/api/session';
import { useChangeRole, useUsers } from '@/lib/api/users';

export default function UsersScreen() {
  const users = useUsers();
  const me = useMe();
  const change = useChangeRole();
  const [pending, setPending] = useState<string | null>(null);
  const { width } = useWindowDimensions();
  const narrow = width < 700;
  return (
    <Screen title="Users & roles" subtitle={`Everyone in ${me.data?.organization.name ?? 'your organisation'}. New sign-ups from your domain join as test engineers.`} testID="users-screen">
      <FormError error={change.error} />
      <QueryState query={users} isEmpty={(d) => d.users.length === 0} empty="No users yet.">
        {(d) => (
          <Card>
            {d.users.map((u) => (
              <View key={u.id} style={[styles.row, narrow && { flexDirection: 'column', alignItems: 'flex-start' }]} testID={`user-${u.email}`}>
                <View style={{ flex: 1, minWidth: 0 }}>
                  <Txt variant="body" numberOfLines={1}>{u.name}</Txt>
                  <Txt variant="caption" numberOfLines={1}>{u.email}</Txt>
                </View>
                <View style={styles.roles} accessibilityRole="radiogroup" accessibilityLabel={`Role of ${u.name}`}>
                  {ROLES.map((r: Role) => {
                    const active = u.role === r;
                    return (
                      <Pressable
                        key={r}
                        accessibilityRole="radio"
                        aria-checked={active}
                        disabled={active || change.isPending}
                        onPress={() => {
                          setPending(u.id);
                          change.mutate({ userId: u.id, role: r }, { onSettled: () => setPending(null) });
                        }}
                        style={[styles.role, active && styles.roleActive, pending === u.id && { opacity: 0.6 }]}
                      >
                        <Txt variant="caption" style={{ color: active ? '#fff' : theme.color.inkSoft }}>
                          {ROLE_LABELS[r]}
                        </Txt>
                      </Pressable>
                    );
                  })}
                </View>
              </View>
            ))}
          </Card>
        )}
      </QueryState>
    </Screen>
  );
}

const styles = StyleSheet.create({
  row: { flexDirection: 'row', alignItems: 'center', gap: 12, paddingVertical: 10, borderBottomWidth: 1, borderBottomColor: theme.color.sunken },
  roles: { flexDirection: 'row', flexWrap: 'wrap', gap: 6 },
  role: { paddingHorizontal: 10, paddingVertical: 5, borderRadius: 999, borderWidth: 1, borderColor: theme.color.line },
  roleActive: { backgroundColor: theme.color.ink, borderColor: theme.color.ink },
});
