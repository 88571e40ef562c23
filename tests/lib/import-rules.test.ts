/**
 * The layering rules of docs/style.md, checked on the source text: a route does not import
 * another route (shared work lives in server/services/); lib/ stays pure (no server, database,
 * screens or node I/O), so the engines run the same in the browser, the CLI and the workers;
 * db/ does not reach up into the server. And no server or lib file grows past 400 lines.
 */
import { readdirSync, readFileSync, statSync } from 'node:fs';
import path from 'node:path';

const ROOT = path.resolve(__dirname, '..', '..');
const NODE_IO = new Set(['fs', 'fs/promises', 'net', 'http', 'https', 'http2', 'child_process', 'worker_threads', 'cluster', 'dgram', 'dns', 'tls', 'readline', 'os']);
const MAX_LINES = 400;
/** Files over MAX_LINES that belong to another change this round (lib/iv is being reworked on its own branch). */
const LONG_FILE_EXCEPTIONS = new Set(['lib/iv/parse.ts']);

/** Every .ts/.tsx file under `dir` (relative to the repository, forward slashes). */
function sources(dir: string): string[] {
  const out: string[] = [];
  const walk = (rel: string) => {
    for (const name of readdirSync(path.join(ROOT, rel))) {
      const child = `${rel}/${name}`;
      if (name === 'node_modules' || name === 'migrations') continue;
      if (statSync(path.join(ROOT, child)).isDirectory()) walk(child);
      else if (/\.tsx?$/.test(name) && !name.endsWith('.d.ts')) out.push(child);
    }
  };
  walk(dir);
  return out;
}

/** The module specifiers a file imports (static, dynamic, require, re-export), as written. */
export function specifiersOf(text: string): string[] {
  const out: string[] = [];
  const patterns = [/\bfrom\s+['"]([^'"]+)['"]/g, /\bimport\s+['"]([^'"]+)['"]/g, /\b(?:require|import)\s*\(\s*['"]([^'"]+)['"]\s*\)/g];
  for (const re of patterns) for (const m of text.matchAll(re)) out.push(m[1]);
  return out;
}

/** What a specifier names: a repository path (for `@/` and relative ones) or a package / node module. */
function target(file: string, spec: string): { kind: 'repo'; path: string } | { kind: 'package'; name: string } {
  if (spec.startsWith('@/')) return { kind: 'repo', path: spec.slice(2) };
  if (spec.startsWith('.')) return { kind: 'repo', path: path.posix.normalize(path.posix.join(path.posix.dirname(file), spec)) };
  return { kind: 'package', name: spec.replace(/^node:/, '') };
}

/** Every broken layering rule in the given files, one sentence each. */
export function violations(files: { file: string; text: string }[]): string[] {
  const out: string[] = [];
  for (const { file, text } of files) {
    for (const spec of specifiersOf(text)) {
      const t = target(file, spec);
      if (file.startsWith('server/routes/') && t.kind === 'repo' && t.path.startsWith('server/routes/')) {
        out.push(`${file} imports the route ${spec}: move what both need into server/services/`);
      }
      if (file.startsWith('lib/')) {
        if (t.kind === 'repo' && /^(server|db|app|components)(\/|$)/.test(t.path)) out.push(`${file} imports ${spec}: lib/ is pure and may not use ${t.path.split('/')[0]}/`);
        if (t.kind === 'package' && NODE_IO.has(t.name)) out.push(`${file} imports the node I/O module ${spec}: lib/ does no I/O`);
      }
      if (file.startsWith('db/') && t.kind === 'repo' && /^server(\/|$)/.test(t.path)) out.push(`${file} imports ${spec}: db/ may not depend on the server`);
    }
  }
  return out;
}

const read = (file: string) => ({ file, text: readFileSync(path.join(ROOT, file), 'utf8') });

describe('layering rules', () => {
  it('the checker catches each kind of breach (so a pass below means something)', () => {
    expect(
      violations([
        { file: 'server/routes/curves.ts', text: "import { loadBatch } from '@/server/routes/batches';" },
        { file: 'server/routes/reviews.ts', text: "import { x } from './batches';" },
        { file: 'lib/quality/a.ts', text: "import type { Db } from '@/db/client';\nimport { readFileSync } from 'node:fs';" },
        { file: 'lib/strings/b.ts', text: "const w = require('worker_threads');\nimport { y } from '../../server/errors';" },
        { file: 'db/seed.ts', text: "import { storeCurve } from '@/server/services/curves';" },
        // Allowed: a route using a service, lib using lib and a pure package, db using lib.
        { file: 'server/routes/ok.ts', text: "import { a } from '@/server/services/batches';\nimport { b } from '@/server/permissions';" },
        { file: 'lib/ok.ts', text: "import Papa from 'papaparse';\nimport { c } from '@/lib/iv';" },
        { file: 'db/ok.ts', text: "import { d } from '@/lib/iv';" },
      ]),
    ).toHaveLength(7);
  });

  it('no route imports another route, lib/ is pure, db/ does not import the server', () => {
    const files = [...sources('server'), ...sources('lib'), ...sources('db')].map(read);
    expect(files.length).toBeGreaterThan(50);
    expect(violations(files)).toEqual([]);
  });

  it(`no server or lib file is longer than ${MAX_LINES} lines`, () => {
    const long = [...sources('server'), ...sources('lib')]
      .filter((f) => !LONG_FILE_EXCEPTIONS.has(f))
      .map((f) => ({ f, lines: read(f).text.split('\n').length }))
      .filter((x) => x.lines > MAX_LINES)
      .map((x) => `${x.f}: ${x.lines} lines`);
    expect(long).toEqual([]);
  });
});
