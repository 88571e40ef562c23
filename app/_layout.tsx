import { QueryClientProvider } from '@tanstack/react-query';
import { useFonts } from 'expo-font';
import { Stack } from 'expo-router';
import { startTransition, useEffect, useState } from 'react';
import { ActivityIndicator, View } from 'react-native';
import { AccountWaiting } from '@/components/account-waiting';
import { installFocusRing } from '@/components/focus-ring';
import { theme } from '@/components/theme';
import { queryClient } from '@/lib/api/query-client';
import { useAccount } from '@/lib/api/session';
import { applyZodSettings } from '@/lib/schemas/zod-setup';

export { ErrorBoundary } from 'expo-router';

installFocusRing();
applyZodSettings(); // no eval probe under the page's CSP (see lib/schemas/zod-setup.ts)

/**
 * Chooses the signed-in or signed-out route group from the session; a signed-in person who is not
 * (yet) an active member — address unverified, request waiting — sees only what to do about it.
 */
function Routes() {
  const me = useAccount();
  // The navigator is put in as a transition once the session is known. Its screens load lazily;
  // drawn in a plain update, React would first commit their loading placeholder and then hold the
  // loaded screen back for its 300 ms reveal throttle (React 19). In a transition it waits the
  // moment the already-started loads need (index.ts) and commits the screen directly.
  const [drawn, setDrawn] = useState(false);
  const settled = !me.isPending;
  useEffect(() => {
    if (settled && !drawn) startTransition(() => setDrawn(true));
  }, [settled, drawn]);
  if (me.isPending || !drawn) {
    return (
      <View style={{ flex: 1, alignItems: 'center', justifyContent: 'center', backgroundColor: theme.color.paper }} testID="app-loading">
        <ActivityIndicator color={theme.color.electron} />
      </View>
    );
  }
  if (me.data && me.data.account_state !== 'active') return <AccountWaiting account={me.data} />;
  const signedIn = !!me.data;
  return (
    <Stack screenOptions={{ headerShown: false, contentStyle: { backgroundColor: theme.color.paper } }}>
      <Stack.Protected guard={signedIn}>
        <Stack.Screen name="(app)" />
      </Stack.Protected>
      <Stack.Protected guard={!signedIn}>
        <Stack.Screen name="(auth)" />
      </Stack.Protected>
      <Stack.Screen name="+not-found" />
    </Stack>
  );
}

export default function RootLayout() {
  // The first screen waits only for the three sans weights it sets text in (the server preloads
  // them, server/web-assets.ts); the mono faces for figures load with the signed-in frame
  // (app/(app)/_layout.tsx), so the sign-in page does not fetch them. No bold face: nothing is
  // set heavier than semibold (theme.font.bold is the semibold face).
  const [fontsLoaded, fontError] = useFonts({
    PlexSans: require('@/assets/fonts/web/IBMPlexSans_400Regular.ttf'),
    'PlexSans-Medium': require('@/assets/fonts/web/IBMPlexSans_500Medium.ttf'),
    'PlexSans-SemiBold': require('@/assets/fonts/web/IBMPlexSans_600SemiBold.ttf'),
  });

  // The session is asked for while the faces load, so the first screen does not wait for one and then the other.
  return <QueryClientProvider client={queryClient}>{fontsLoaded || fontError ? <Routes /> : <SessionEarly />}</QueryClientProvider>;
}

/** Starts the session query (the answer waits in the query cache for Routes); draws nothing. */
function SessionEarly() {
  useAccount();
  return null;
}
