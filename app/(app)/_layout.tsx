import { Stack } from 'expo-router';
import { AppShell } from '@/components/app-shell';
import { theme } from '@/components/theme';
import { useMe } from '@/lib/api/session';

/** Signed-in frame. The root layout only mounts this group when there is a session. */
export default function AppLayout() {
  const me = useMe();
  if (!me.data) return null;
  return (
    <AppShell me={me.data}>
      <Stack screenOptions={{ headerShown: false, contentStyle: { backgroundColor: theme.color.paper } }} />
    </AppShell>
  );
}
