/**
 * Which files of the app folder draw a given address: the route file that matches the path and
 * every layout above it. The web build loads each route file as its own script on first use
 * (expo-router's async routes); the root layout starts those loads for the address being opened
 * while the faces and the session load, so the first screen does not wait for them one after the
 * other (app/_layout.tsx).
 *
 * Keys are the app folder's relative file names as the router's file context lists them:
 * `./(auth)/sign-in.tsx`, `./(app)/batches/[batchId].tsx`, `./(app)/_layout.tsx`.
 */

const GROUP = /^\(.+\)$/;

/** A route file's address segments: groups dropped, `index` dropped, the extension dropped. */
function routeSegments(key: string): string[] {
  const parts = key.replace(/^\.\//, '').replace(/\.[tj]sx?$/, '').split('/');
  const segs = parts.filter((p) => !GROUP.test(p));
  if (segs[segs.length - 1] === 'index') segs.pop();
  return segs;
}

function matches(pattern: string[], path: string[]): boolean {
  for (let i = 0; i < pattern.length; i++) {
    const p = pattern[i];
    if (/^\[\.\.\..+\]$/.test(p)) return path.length > i; // a catch-all takes one segment or more
    if (i >= path.length) return false;
    if (/^\[.+\]$/.test(p)) continue;
    if (p !== path[i]) return false;
  }
  return pattern.length === path.length;
}

/** How specific a match is: literal segments first, then one-segment parameters, catch-alls last. */
function specificity(pattern: string[]): number {
  return pattern.reduce((s, p) => s * 3 + (/^\[\.\.\./.test(p) ? 0 : /^\[/.test(p) ? 1 : 2), 1);
}

/**
 * The route file for `pathname` (the most specific match; null when none, i.e. the not-found
 * screen) and the layouts of every folder from the app root down to it, outermost first.
 */
export function routeFilesFor(keys: readonly string[], pathname: string): string[] {
  const path = pathname.split('?')[0].split('/').filter(Boolean).map((s) => decodeURIComponent(s));
  const routes = keys.filter((k) => !/(^|\/)_layout\.[tj]sx?$/.test(k) && !/(^|\/)\+/.test(k) && /\.[tj]sx?$/.test(k));
  const found = routes.filter((k) => matches(routeSegments(k), path)).sort((a, b) => specificity(routeSegments(b)) - specificity(routeSegments(a)) || a.localeCompare(b))[0];
  if (!found) return [];
  const dirs = found.replace(/^\.\//, '').split('/').slice(0, -1);
  const layouts: string[] = [];
  for (let i = 0; i <= dirs.length; i++) {
    const key = ['.', ...dirs.slice(0, i), '_layout.tsx'].join('/');
    if (keys.includes(key)) layouts.push(key);
  }
  return [...layouts, found];
}
