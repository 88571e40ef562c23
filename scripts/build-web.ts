/**
 * Exports the web app to dist/ with Expo, but only when its sources changed since the last
 * export (a content hash is kept in dist/.source-hash): a cold export takes minutes here.
 * `--force` always rebuilds.
 */
import { spawn } from 'node:child_process';
import { createHash } from 'node:crypto';
import { existsSync, readdirSync, readFileSync, statSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import zlib from 'node:zlib';

const ROOT = path.resolve(__dirname, '..');
const SOURCES = ['index.ts', 'app', 'components', 'lib', 'assets', 'scripts/web-shims', 'app.json', 'babel.config.js', 'metro.config.js', 'package-lock.json', 'tsconfig.json'];

/**
 * Expo's tree shaking for the production export (documented by Expo as experimental, behind these
 * two variables): modules keep only the exports something imports. It takes mathjs's whole
 * function library (its unit system is all the forms use) out of the bundle every screen loads —
 * that shared bundle fell from 2.96 MB to 1.83 MB and the cold visit to the sign-in page from
 * 1,020 kB to 702 kB of transfer with the same fonts. The browser tests run on this export.
 */
const EXPORT_ENV = { EXPO_UNSTABLE_METRO_OPTIMIZE_GRAPH: '1', EXPO_UNSTABLE_TREE_SHAKING: '1' };
const HASH_FILE = path.join(ROOT, 'dist', '.source-hash');

function walk(p: string, out: string[]) {
  const full = path.join(ROOT, p);
  if (!existsSync(full)) return;
  if (statSync(full).isDirectory()) {
    for (const name of readdirSync(full).sort()) walk(path.join(p, name), out);
  } else out.push(p);
}

export function sourceHash(): string {
  const files: string[] = [];
  for (const s of SOURCES) walk(s, files);
  const h = createHash('sha256');
  h.update(JSON.stringify(EXPORT_ENV));
  for (const f of files) {
    h.update(f);
    h.update(readFileSync(path.join(ROOT, f)));
  }
  return h.digest('hex');
}

/**
 * Writes `<file>.br` (brotli, best quality: about a fifth smaller than what the server's on-the-fly
 * compression sends, and too slow to do per request) beside every hashed script and font of the
 * export; server/web-assets.ts sends them to browsers that accept brotli.
 */
function preCompress(): void {
  const files: string[] = [];
  walk(path.join('dist', '_expo'), files);
  walk(path.join('dist', 'assets'), files);
  for (const f of files.filter((x) => /[.-][0-9a-f]{32}\.(js|ttf)$/.test(x))) {
    const full = path.join(ROOT, f);
    writeFileSync(`${full}.br`, zlib.brotliCompressSync(readFileSync(full), { params: { [zlib.constants.BROTLI_PARAM_QUALITY]: 11 } }));
  }
}

/** The export's hash when dist/ is stale (or `force`), else null. */
function staleHash(force: boolean): string | null {
  const hash = sourceHash();
  if (!force && existsSync(HASH_FILE) && readFileSync(HASH_FILE, 'utf8') === hash && existsSync(path.join(ROOT, 'dist', 'index.html'))) {
    console.log('[build:web] dist/ is up to date');
    return null;
  }
  console.log('[build:web] exporting the web app with Expo (a cold export takes 1–3 minutes)…');
  return hash;
}

/**
 * Builds dist/ when stale; returns true when it exported. The export is an asynchronous child, so
 * the caller's event loop runs on meanwhile (`npm test` notices the end of its seeding server
 * while a cold export runs).
 */
export async function buildWeb(force = false): Promise<boolean> {
  const hash = staleHash(force);
  if (!hash) return false;
  const started = Date.now();
  const child = spawn('npx', ['expo', 'export', '--platform', 'web', '--output-dir', 'dist'], {
    cwd: ROOT,
    stdio: ['ignore', 'inherit', 'inherit'],
    env: { ...process.env, CI: '1', EXPO_NO_TELEMETRY: '1', ...EXPORT_ENV },
  });
  const status = await new Promise<number | null>((resolve) => {
    child.on('error', () => resolve(-1));
    child.on('exit', (code) => resolve(code));
  });
  if (status !== 0) throw new Error(`expo export failed with status ${status}`);
  preCompress();
  writeFileSync(HASH_FILE, hash);
  console.log(`[build:web] done in ${((Date.now() - started) / 1000).toFixed(0)} s`);
  return true;
}

if (require.main === module) {
  buildWeb(process.argv.includes('--force')).catch((err: Error) => {
    console.error(err.message);
    process.exit(1);
  });
}
