/**
 * Writes the typed-routes declaration (.expo/types/router.d.ts) from the routes in app/, with the
 * generator `expo start` and `expo customize tsconfig.json` use (@expo/router-server, shipped
 * inside expo's CLI). The file is committed so that `tsc --noEmit` checks every href on a fresh
 * clone without a dev server; `--check` only compares and exits 1 when app/ has moved on
 * (tests/components/route-types.test.tsx does the same in the test run).
 */
import { existsSync, mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import path from 'node:path';

const ROOT = path.resolve(__dirname, '..');
const APP_DIR = path.join(ROOT, 'app');
export const ROUTE_TYPES_FILE = path.join(ROOT, '.expo', 'types', 'router.d.ts');

type RouteContext = { keys(): string[] };
type Generator = { getTypedRoutesDeclarationFile(ctx: RouteContext, options?: object): string | undefined };

/** The declaration file for the routes in app/, as text. */
export function routeTypes(): string {
  // The generator lives beside expo's CLI (not a dependency of ours): resolve it from there.
  const cliDir = path.dirname(require.resolve('@expo/cli/package.json', { paths: [path.dirname(require.resolve('expo/package.json', { paths: [ROOT] }))] }));
  const generator = require(require.resolve('@expo/router-server/build/typed-routes/generate', { paths: [cliDir] })) as Generator;
  const { requireContext } = require('expo-router/internal/testing') as { requireContext(dir: string, recursive: boolean, ignore: RegExp): RouteContext };
  const { EXPO_ROUTER_CTX_IGNORE } = require('expo-router/_ctx-shared') as { EXPO_ROUTER_CTX_IGNORE: RegExp };
  const text = generator.getTypedRoutesDeclarationFile(requireContext(APP_DIR, true, EXPO_ROUTER_CTX_IGNORE), {});
  if (!text) throw new Error('expo-router produced no route types for app/');
  return text;
}

/** The committed declaration, or null when there is none. */
export function committedRouteTypes(): string | null {
  return existsSync(ROUTE_TYPES_FILE) ? readFileSync(ROUTE_TYPES_FILE, 'utf8') : null;
}

if (require.main === module) {
  const text = routeTypes();
  const rel = path.relative(ROOT, ROUTE_TYPES_FILE);
  if (process.argv.includes('--check')) {
    if (committedRouteTypes() !== text) {
      console.error(`${rel} does not match app/: run npx tsx scripts/route-types.ts and commit it`);
      process.exit(1);
    }
    console.log(`${rel} matches app/`);
  } else {
    mkdirSync(path.dirname(ROUTE_TYPES_FILE), { recursive: true });
    writeFileSync(ROUTE_TYPES_FILE, text);
    console.log(`wrote ${rel}`);
  }
}
