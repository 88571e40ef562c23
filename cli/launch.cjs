'use strict';
/**
 * What `npm run cli` starts: plain Node, no TypeScript loader. It runs the bundle build/cli.cjs
 * (made by scripts/build-cli.ts) after checking that none of the bundle's inputs changed since
 * it was built — one stat per recorded file against build/cli-inputs.json. When the bundle is
 * missing or stale it builds it first (through tsx, loaded only then), so a fresh clone needs
 * only `npm install` and an edit is never answered by old code.
 * Kept in JavaScript and tiny on purpose: it is on every start's path.
 */
const fs = require('node:fs');
const path = require('node:path');

const root = path.join(__dirname, '..');

function fresh() {
  let record;
  try {
    record = JSON.parse(fs.readFileSync(path.join(root, 'build', 'cli-inputs.json'), 'utf8'));
  } catch {
    return false;
  }
  for (const [file, size, mtimeMs] of record.inputs) {
    const st = fs.statSync(path.join(root, file), { throwIfNoEntry: false });
    if (!st || st.size !== size || st.mtimeMs !== mtimeMs) return false;
  }
  return true;
}

if (!fresh()) {
  const unregister = require('tsx/cjs/api').register();
  try {
    require(path.join(root, 'scripts', 'build-cli.ts')).buildCli();
  } catch (err) {
    // esbuild has printed the errors with their places; the old bundle must not run instead.
    console.error(`the command line could not be built: ${err instanceof Error ? err.message.split('\n')[0] : String(err)}`);
    process.exit(1);
  } finally {
    unregister();
  }
}
require(path.join(root, 'build', 'cli.cjs'));
