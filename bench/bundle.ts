/**
 * Size of the web app's first load (issue 8, item 5): the JavaScript files dist/index.html loads
 * (`<script src>` and modulepreload links), raw and gzip-compressed (level 6, what a web server
 * typically sends; brotli shown too). Target: under 1 MB (10⁶ bytes) compressed.
 * Reads the existing export: build it first under the shared lock
 * (`flock /tmp/ql-web.lock npx tsx scripts/build-web.ts`).
 */
import { existsSync, readFileSync, statSync } from 'node:fs';
import path from 'node:path';
import { brotliCompressSync, gzipSync } from 'node:zlib';
import { round } from '@/bench/stats';
import { REPO_ROOT } from '@/tests/support/server-process';
import { sourceHash } from '@/scripts/build-web';

export const TARGET_FIRST_LOAD_GZIP_BYTES = 1_000_000;

/** Measures dist/; returns `{ missing: true }` when there is no export. */
export async function benchBundle(): Promise<Record<string, unknown>> {
  const dist = path.join(REPO_ROOT, 'dist');
  const indexFile = path.join(dist, 'index.html');
  if (!existsSync(indexFile)) {
    console.log('Web bundle — dist/index.html not found: run `npx tsx scripts/build-web.ts` first');
    return { missing: true };
  }
  const html = readFileSync(indexFile, 'utf8');
  const srcs = [
    ...[...html.matchAll(/<script[^>]*\ssrc="([^"]+)"/g)].map((m) => m[1]),
    ...[...html.matchAll(/<link[^>]*rel="modulepreload"[^>]*href="([^"]+)"/g)].map((m) => m[1]),
  ];
  const scripts = srcs.map((src) => {
    const file = path.join(dist, src.replace(/^\//, ''));
    const bytes = readFileSync(file);
    return { src, raw_bytes: bytes.byteLength, gzip_bytes: gzipSync(bytes, { level: 6 }).byteLength, brotli_bytes: brotliCompressSync(bytes).byteLength };
  });
  const sum = (k: 'raw_bytes' | 'gzip_bytes' | 'brotli_bytes') => scripts.reduce((s, x) => s + x[k], 0);
  const hashFile = path.join(dist, '.source-hash');
  const upToDate = existsSync(hashFile) && readFileSync(hashFile, 'utf8') === sourceHash();
  const figures = {
    scripts,
    first_load_raw_bytes: sum('raw_bytes'),
    first_load_gzip_bytes: sum('gzip_bytes'),
    first_load_brotli_bytes: sum('brotli_bytes'),
    built_at: statSync(indexFile).mtime.toISOString(),
    dist_matches_sources: upToDate,
    target_gzip_bytes: TARGET_FIRST_LOAD_GZIP_BYTES,
    ok: sum('gzip_bytes') < TARGET_FIRST_LOAD_GZIP_BYTES,
  };
  const mb = (b: number) => `${round(b / 1e6)} MB`;
  console.log(
    [
      `Web bundle — first-load JavaScript of dist/index.html (${scripts.length} file${scripts.length === 1 ? '' : 's'}, export of ${figures.built_at}${upToDate ? '' : ', OLDER than the sources'})`,
      `  raw ${mb(figures.first_load_raw_bytes)}, gzip ${mb(figures.first_load_gzip_bytes)}, brotli ${mb(figures.first_load_brotli_bytes)}` +
        ` — target gzip < 1 MB: ${figures.ok ? 'ok' : 'MISSED'}`,
    ].join('\n'),
  );
  return figures;
}
