/**
 * Bundles the server with esbuild, as scripts/build-cli.ts does the command line: build/server.cjs
 * (server/index.ts, what `npm run serve` and the tests' server processes run), build/worker.cjs
 * (server/worker.ts, `npm run worker`) and build/analysis-worker.cjs (the handler each analysis
 * thread loads), with build/server-inputs.json recording the size and mtime of every file that
 * went into them. A server process then starts on plain Node: no TypeScript loader resolving and
 * transforming ~160 sources, and the libraries in one file, tree-shaken (mathjs alone took ~0.8 s
 * to load whole). Measured on the 2-core machine: ~6.5 s → ~3 s to the first /api/health answer
 * on a seeded data folder (DEVELOPERS.md, "Server start").
 *
 * Run: `npm run build:server` (always builds). server/launch.cjs and tests/support/server-process.ts
 * build first when the record differs from the disk (`buildServerIfStale`).
 */
import { build, version as esbuildVersion } from 'esbuild';
import type { Plugin } from 'esbuild';
import { mkdirSync, readFileSync, statSync } from 'node:fs';
import path from 'node:path';
import { recordedInputs, recordIsFresh, statInput, writeAtomic } from './build-cli';
import type { InputRecord } from './build-cli';

const ROOT = path.resolve(__dirname, '..');
export const SERVER_BUILD_DIR = path.join(ROOT, 'build');
export const SERVER_BUNDLE = path.join(SERVER_BUILD_DIR, 'server.cjs');
export const WORKER_BUNDLE = path.join(SERVER_BUILD_DIR, 'worker.cjs');
export const ANALYSIS_WORKER_BUNDLE = path.join(SERVER_BUILD_DIR, 'analysis-worker.cjs');
export const SERVER_INPUTS = path.join(SERVER_BUILD_DIR, 'server-inputs.json');

const ENTRIES = [
  { in: 'server/index.ts', out: 'server' },
  { in: 'server/worker.ts', out: 'worker' },
  { in: 'server/services/analysis-worker.ts', out: 'analysis-worker' },
];

/**
 * Packages loaded from node_modules as they are, because they read files beside their own module
 * at run time: PGlite its WebAssembly and data files, pdfkit its font metrics and colour profile,
 * piscina the file each thread starts from; s3rver (the local S3 fake) and its Koa stack are left
 * whole too.
 */
const EXTERNAL = ['@electric-sql/pglite', 'pdfkit', 'piscina', 's3rver'];

/** Files whose change must rebuild the bundles besides the bundled sources. */
const BUILD_FILES = ['tsconfig.json', 'scripts/build-server.ts', 'scripts/build-cli.ts', 'node_modules/esbuild/package.json', 'package-lock.json'];

/**
 * The sources find repository files from their own folder (`__dirname`: db/migrations,
 * sample-data, assets/fonts, dist, the analysis thread's file). In a bundle `__dirname` is build/,
 * so each source's `__dirname` becomes its own folder again, relative to the bundle (the checkout
 * may move).
 */
const sourceDirname: Plugin = {
  name: 'source-dirname',
  setup(b) {
    b.onLoad({ filter: /\.tsx?$/ }, (args) => {
      if (args.path.includes(`${path.sep}node_modules${path.sep}`)) return undefined;
      const text = readFileSync(args.path, 'utf8');
      if (!text.includes('__dirname')) return undefined;
      const rel = path.relative(SERVER_BUILD_DIR, path.dirname(args.path)).split(path.sep).join('/');
      return { contents: text.replace(/\b__dirname\b/g, `require('node:path').join(__dirname, ${JSON.stringify(rel)})`), loader: args.path.endsWith('x') ? 'tsx' : 'ts' };
    });
  },
};

/**
 * Builds the three bundles (CommonJS for Node 20, whitespace and syntax minified, names kept for
 * readable stack traces, linked source maps) and the input record; returns the build time in ms.
 * Concurrent builds are safe: each file is replaced whole, the record last.
 */
export async function buildServer(): Promise<number> {
  const started = performance.now();
  const startedAt = Date.now();
  const result = await build({
    absWorkingDir: ROOT,
    entryPoints: ENTRIES,
    outdir: SERVER_BUILD_DIR,
    outExtension: { '.js': '.cjs' },
    bundle: true,
    platform: 'node',
    format: 'cjs',
    target: 'node20',
    external: EXTERNAL,
    minifyWhitespace: true,
    minifySyntax: true,
    treeShaking: true,
    sourcemap: 'linked',
    // The analysis pool starts its threads on build/analysis-worker.cjs instead of the tsx bootstrap.
    define: { QUASILEVEL_BUNDLE: 'true' },
    plugins: [sourceDirname],
    metafile: true,
    write: false,
    logLevel: 'warning',
  });
  const inputs = recordedInputs([...Object.keys(result.metafile.inputs), ...BUILD_FILES], startedAt);
  mkdirSync(SERVER_BUILD_DIR, { recursive: true });
  for (const out of result.outputFiles) writeAtomic(out.path, out.contents);
  const outputs = [SERVER_BUNDLE, WORKER_BUNDLE, ANALYSIS_WORKER_BUNDLE].map((f) => statInput(path.relative(ROOT, f)));
  const record: InputRecord = { esbuild: esbuildVersion, inputs: [...inputs, ...outputs] };
  writeAtomic(SERVER_INPUTS, `${JSON.stringify(record)}\n`);
  return performance.now() - started;
}

/** True when the bundles exist and no input differs from the record (server/launch.cjs's test). */
export function serverBundleIsFresh(): boolean {
  return recordIsFresh(SERVER_INPUTS);
}

let building: Promise<boolean> | null = null;

/** Builds when stale (one build at a time in this process); resolves true when it built. */
export function buildServerIfStale(): Promise<boolean> {
  if (serverBundleIsFresh()) return Promise.resolve(false);
  building ??= buildServer()
    .then(() => true)
    .finally(() => (building = null));
  return building;
}

if (require.main === module) {
  buildServer().then(
    (ms) => {
      const kb = (f: string) => (statSync(f).size / 1024).toFixed(0);
      console.log(`[build:server] build/server.cjs (${kb(SERVER_BUNDLE)} kB), worker.cjs (${kb(WORKER_BUNDLE)} kB), analysis-worker.cjs (${kb(ANALYSIS_WORKER_BUNDLE)} kB) in ${ms.toFixed(0)} ms`);
    },
    (err: Error) => {
      console.error(`[build:server] ${err.message.split('\n')[0]}`);
      process.exit(1);
    },
  );
}
