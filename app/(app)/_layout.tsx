import * as Font from 'expo-font';
import { Stack } from 'expo-router';
import { useEffect } from 'react';
import { AppShell } from '@/components/app-shell';
import { theme } from '@/components/theme';
import { useMe } from '@/lib/api/session';

/** Signed-in frame. The root layout only mounts this group when there is a session. */
export default function AppLayout() {
  const me = useMe();
  // The mono faces (figures, device ids) are fetched once signed in, not on the sign-in page;
  // until they arrive such text shows in the fallback face.
  useEffect(() => {
    Font.loadAsync({
      PlexMono: require('@/assets/fonts/web/IBMPlexMono_400Regular.ttf'),
      'PlexMono-SemiBold': require('@/assets/fonts/web/IBMPlexMono_600SemiBold.ttf'),
    }).catch(() => undefined);
  }, []);
  if (!me.data) return null;
  return (
    <AppShell me={me.data}>
      <Stack screenOptions={{ headerShown: false, contentStyle: { backgroundColor: theme.color.paper } }} />
    </AppShell>
  );
}
