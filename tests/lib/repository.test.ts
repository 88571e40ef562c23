/**
 * The repository stands on its own: no source file reads a path outside it (a fresh clone with
 * nothing beside it must pass its tests, run its benchmark and serve). The reference curves the
 * tests use are in tests/fixtures/reference-data.
 */
import { readdirSync, readFileSync, statSync } from 'node:fs';
import path from 'node:path';
import { ALLOW_MARKER, findOutsidePaths } from '@/tests/support/outside-paths';

const ROOT = path.resolve(__dirname, '..', '..');
const SOURCE_DIRS = ['app', 'components', 'lib', 'server', 'db', 'cli', 'scripts', 'bench', 'tests'];
const SOURCE_FILE = /\.(ts|tsx|js|jsx|mjs|cjs)$/;
/** Data the tests read, not code. */
const SKIP = new Set([path.join(ROOT, 'tests', 'fixtures')]);

function sourceFiles(dir: string): string[] {
  if (SKIP.has(dir)) return [];
  return readdirSync(dir).flatMap((name) => {
    const p = path.join(dir, name);
    if (statSync(p).isDirectory()) return sourceFiles(p);
    return SOURCE_FILE.test(name) ? [p] : [];
  });
}

const rootConfigs = readdirSync(ROOT).filter((name) => SOURCE_FILE.test(name)).map((name) => path.join(ROOT, name));
const files = [...SOURCE_DIRS.flatMap((d) => sourceFiles(path.join(ROOT, d))), ...rootConfigs];

describe('no source file refers to a path outside the repository', () => {
  it('finds the source files to check', () => {
    // A check that reads nothing passes for nothing: the tree has well over a hundred source files.
    expect(files.length).toBeGreaterThan(150);
    expect(files).toContain(path.join(ROOT, 'tests', 'lib', 'repository.test.ts'));
  });

  it('every file under app/, components/, lib/, server/, db/, cli/, scripts/, bench/, tests/ and the root configs', () => {
    const found = files.flatMap((f) => findOutsidePaths(f, readFileSync(f, 'utf8'), ROOT));
    const described = found.map((x) => `${path.relative(ROOT, x.file)}:${x.line}  ${x.text}  → ${x.resolved}`);
    expect(described).toEqual([]);
  });
});

describe('the check itself (each case a line of code it must judge)', () => {
  // Judged as if written in <root>/tests/server/example.test.ts with the root at /repo/app.
  const root = '/repo/app';
  const file = '/repo/app/tests/server/example.test.ts';
  const check = (code: string) => findOutsidePaths(file, code, root).map((x) => x.resolved);

  it.each([
    ["const REF = path.resolve(__dirname, '../../../shared/reference-data');", '/repo/shared/reference-data'],
    ["const REF = path.join(__dirname, '..', '..', '..', 'shared');", '/repo/shared'],
    ["const text = readFileSync('/repo/shared/reference-data/cell.csv', 'utf8');", '/repo/shared/reference-data/cell.csv'],
    // repository-check: outside on purpose: the expected finding of this example.
    ["const text = readFileSync('/work/shared/reference-data/cell.csv', 'utf8');", '/work/shared/reference-data/cell.csv'],
    ["const up = path.resolve(process.cwd(), '..');", '/repo'],
    ["const ROOT = path.resolve(__dirname, '../..');\nconst out = path.join(ROOT, '..', 'other');", '/repo/other'],
    ["import { x } from '../../../elsewhere/x';", '/repo/elsewhere/x'],
    ["const file = '../../../shared/DOMAIN.md';", '/repo/shared/DOMAIN.md'],
  ])('%s is outside', (code, resolved) => {
    expect(check(code)).toEqual([resolved]);
  });

  it.each([
    "const ROOT = path.resolve(__dirname, '..', '..');",
    "const REF = path.join(__dirname, '..', '..', 'tests', 'fixtures', 'reference-data');",
    "import { startHarness } from '../server/harness';",
    "const dir = mkdtempSync(path.join(os.tmpdir(), 'ql-'));",
    "const chromium = '/usr/bin/chromium'; const res = await fetch('/api/health');",
    'const name = `../../${tag}-a.csv`; // an upload name, not a path this code opens',
    `const up = path.resolve(process.cwd(), '..'); // ${ALLOW_MARKER}: checks nothing was written there`,
  ])('%s is fine', (code) => {
    expect(check(code)).toEqual([]);
  });
});
