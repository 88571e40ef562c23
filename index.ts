/**
 * The app's entry (package.json `main`), ahead of Expo Router's own.
 *
 * On the web every route file is a script of its own (the router's async routes), loaded when the
 * router first draws it. Drawn before its script is there, a screen first commits the router's
 * loading placeholder and React then holds the loaded screen back for its reveal throttle (300 ms
 * in React 19): measured on a cold visit to /sign-in, the root layout came ~260 ms after the page's
 * scripts had run although its file was already downloaded. So this entry first runs the scripts
 * of the address being opened (the root layout, the layouts above the screen, the screen; the
 * page's head has already made the browser fetch them, server/web-assets.ts) and only then starts
 * the router, whose first render (a transition) then finds them loaded. A load that fails is left
 * to the router, which asks again and shows its error; native builds start the router at once.
 */
import '@expo/metro-runtime';
import 'expo'; // installs the web's script loader (Expo.fx) that the route files' loads go through
import { ctx } from 'expo-router/_ctx';
import { Platform } from 'react-native';
import { routeFilesFor } from '@/lib/route-files';

function startRouter(): void {
  require('expo-router/entry-classic');
}

if (Platform.OS === 'web' && typeof window !== 'undefined') {
  const loads = routeFilesFor(ctx.keys(), window.location.pathname).map((key) => Promise.resolve().then(() => ctx(key)));
  Promise.allSettled(loads).then(startRouter, startRouter);
} else {
  startRouter();
}
