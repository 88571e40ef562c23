import { Stack } from 'expo-router';
import { can } from '@/lib/auth/roles';
import { useMe } from '@/lib/api/session';

/** Admin screens: shown only to roles that manage users (the API enforces the same rule). */
export default function AdminLayout() {
  const me = useMe();
  const allowed = can(me.data?.role, 'users:manage');
  return (
    <Stack screenOptions={{ headerShown: false }}>
      <Stack.Protected guard={allowed}>
        <Stack.Screen name="users" />
        <Stack.Screen name="outbox" />
      </Stack.Protected>
    </Stack>
  );
}
