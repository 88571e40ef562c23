/**
 * Bundles the command line (cli/main.ts and everything it imports) into build/cli.cjs with
 * esbuild, and records the size and modification time of every file that went into it in
 * build/cli-inputs.json. The launcher (cli/launch.cjs, what `npm run cli` starts) compares that
 * record with the files on each start — a stat per file, about a millisecond — and runs this
 * build first whenever anything differs, so a stale bundle never runs.
 *
 * Run: `npm run build:cli` (always builds). The launcher and the CLI tests build through
 * `buildCliIfStale()`.
 */
import { buildSync, version as esbuildVersion } from 'esbuild';
import { mkdirSync, readFileSync, renameSync, statSync, writeFileSync } from 'node:fs';
import path from 'node:path';

const ROOT = path.resolve(__dirname, '..');
export const CLI_BUILD_DIR = path.join(ROOT, 'build');
export const CLI_BUNDLE = path.join(CLI_BUILD_DIR, 'cli.cjs');
export const CLI_INPUTS = path.join(CLI_BUILD_DIR, 'cli-inputs.json');

/**
 * Files whose change must rebuild the bundle besides the bundled sources: the path aliases, this
 * script and the bundler itself.
 */
const BUILD_FILES = ['tsconfig.json', 'scripts/build-cli.ts', 'node_modules/esbuild/package.json'];

/** One recorded file: path relative to the repository, size in bytes, mtime in ms. */
export type Input = [file: string, size: number, mtimeMs: number];
export type InputRecord = { esbuild: string; inputs: Input[] };

export function statInput(file: string): Input {
  const st = statSync(path.join(ROOT, file));
  return [file, st.size, st.mtimeMs];
}

/** Writes `data` beside `target` and renames it over: a reader sees the old file or the new one, never half. */
/**
 * The inputs of a bundle as its record keeps them. A file changed while esbuild read it may be in
 * the bundle in its old state; it is recorded as unknown, so the next start builds again (the
 * second before on coarse-clock file systems).
 */
export function recordedInputs(files: string[], startedAt: number): Input[] {
  return [...files].sort().map((file): Input => {
    const input = statInput(file);
    return input[2] >= startedAt - 1000 ? [file, input[1], -1] : input;
  });
}

export function writeAtomic(target: string, data: string | Uint8Array): void {
  const tmp = `${target}.${process.pid}.tmp`;
  writeFileSync(tmp, data);
  renameSync(tmp, target);
}

/**
 * Builds build/cli.cjs (minified, tree-shaken, CommonJS for Node 20, every dependency bundled —
 * ESM-only ones included) with its source map and input record; returns the build time in ms.
 * Concurrent builds are safe: each file is replaced whole, the record last.
 */
export function buildCli(): number {
  const started = performance.now();
  const startedAt = Date.now();
  const result = buildSync({
    absWorkingDir: ROOT,
    entryPoints: ['cli/main.ts'],
    outfile: CLI_BUNDLE,
    bundle: true,
    platform: 'node',
    format: 'cjs',
    target: 'node20',
    minify: true,
    treeShaking: true,
    // For readable stack traces: node --enable-source-maps build/cli.cjs …
    sourcemap: 'linked',
    metafile: true,
    write: false,
    logLevel: 'warning',
  });
  const inputs = recordedInputs([...Object.keys(result.metafile.inputs), ...BUILD_FILES], startedAt);
  mkdirSync(CLI_BUILD_DIR, { recursive: true });
  for (const out of result.outputFiles) writeAtomic(out.path, out.contents);
  const record: InputRecord = {
    esbuild: esbuildVersion,
    inputs: [...inputs, statInput(path.relative(ROOT, CLI_BUNDLE))],
  };
  writeAtomic(CLI_INPUTS, `${JSON.stringify(record)}\n`);
  return performance.now() - started;
}

/** True when build/cli.cjs exists and no input differs from the record (the launcher's test, in TypeScript). */
export function cliBundleIsFresh(): boolean {
  return recordIsFresh(CLI_INPUTS);
}

/** True when the input record `recordFile` exists and every file in it has its recorded size and mtime. */
export function recordIsFresh(recordFile: string): boolean {
  let record: InputRecord;
  try {
    record = JSON.parse(readFileSync(recordFile, 'utf8')) as InputRecord;
  } catch {
    return false;
  }
  for (const [file, size, mtimeMs] of record.inputs) {
    try {
      const st = statSync(path.join(ROOT, file));
      if (st.size !== size || st.mtimeMs !== mtimeMs) return false;
    } catch {
      return false;
    }
  }
  return true;
}

/** Builds when stale; returns true when it built. */
export function buildCliIfStale(): boolean {
  if (cliBundleIsFresh()) return false;
  buildCli();
  return true;
}

if (require.main === module) {
  const ms = buildCli();
  const size = statSync(CLI_BUNDLE).size;
  console.log(`[build:cli] ${path.relative(ROOT, CLI_BUNDLE)} (${(size / 1024).toFixed(0)} kB) in ${ms.toFixed(0)} ms`);
}
