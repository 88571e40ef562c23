'use strict';
/**
 * What `npm run serve` and `npm run worker` start: plain Node, no TypeScript loader. It runs the
 * bundle build/server.cjs (or, with the argument `worker`, build/worker.cjs), made by
 * scripts/build-server.ts, after checking that none of the bundles' inputs changed since they were
 * built — one stat per recorded file against build/server-inputs.json (the same test as
 * cli/launch.cjs). When a bundle is missing or stale it builds first (through tsx, loaded only
 * then), so a fresh clone needs only `npm install` and an edit is never answered by old code.
 */
const fs = require('node:fs');
const path = require('node:path');

const root = path.join(__dirname, '..');
const which = process.argv[2] === 'worker' ? 'worker' : 'server';

function fresh() {
  let record;
  try {
    record = JSON.parse(fs.readFileSync(path.join(root, 'build', 'server-inputs.json'), 'utf8'));
  } catch {
    return false;
  }
  for (const [file, size, mtimeMs] of record.inputs) {
    const st = fs.statSync(path.join(root, file), { throwIfNoEntry: false });
    if (!st || st.size !== size || st.mtimeMs !== mtimeMs) return false;
  }
  return true;
}

async function main() {
  if (!fresh()) {
    const unregister = require('tsx/cjs/api').register();
    try {
      await require(path.join(root, 'scripts', 'build-server.ts')).buildServer();
    } catch (err) {
      // esbuild has printed the errors with their places; the old bundle must not run instead.
      console.error(`the server could not be built: ${err instanceof Error ? err.message.split('\n')[0] : String(err)}`);
      process.exit(1);
    } finally {
      unregister();
    }
  }
  require(path.join(root, 'build', `${which}.cjs`));
}

main();
