import { Redirect, Stack } from 'expo-router';
import { can } from '@/lib/auth/roles';
import { useMe } from '@/lib/api/session';

/** Admin screens: only for roles that manage users (the API enforces the same rule). */
export default function AdminLayout() {
  const me = useMe();
  if (!can(me.data?.role, 'users:manage')) return <Redirect href="/" />;
  return <Stack screenOptions={{ headerShown: false }} />;
}
