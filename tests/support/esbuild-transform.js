/**
 * Jest transform for the node projects (lib, server, e2e): esbuild turns TypeScript and the
 * ES-module packages into CommonJS, as the Babel setup did, in a small part of the time. On a
 * clean checkout (empty transform cache) Babel spent about half a minute of CPU per test process on
 * better-auth, drizzle, zod and mathjs alone. The components project keeps jest-expo's Babel
 * preset (React Native needs its Flow and JSX handling, and jest.mock hoisting).
 *
 * Kept as Babel did it: `import x from 'pkg'` reads `.default` of a module that says `__esModule`
 * (esbuild would use node's rule for .mjs files, so their names are given to it as .js),
 * `import()` becomes a promise of `require()`, and `import.meta.url`/`dirname`/`filename` are the
 * file's own. One case esbuild does not handle: a file that declares its own `require` and uses
 * `import()` (PGlite's CommonJS entry does, to make a require for its wasm loader): the
 * `require()` that `import()` becomes would call that local, not the module's. Babel renames the
 * local, so such files still go through Babel with the options the node projects used before.
 */
const crypto = require('node:crypto');
const fs = require('node:fs');
const { transformSync, version } = require('esbuild');

const SELF = crypto.createHash('sha1').update(fs.readFileSync(__filename)).digest('hex');

const IMPORT_META = {
  'import.meta.url': '__jestImportMetaUrl',
  'import.meta.dirname': '__dirname',
  'import.meta.filename': '__filename',
};

const babel = {
  transformer: null,
  get() {
    this.transformer ??= require('babel-jest').default.createTransformer({
      configFile: false,
      babelrc: false,
      presets: [['@babel/preset-typescript', { allowDeclareFields: true }]],
      plugins: ['@babel/plugin-transform-modules-commonjs', '@babel/plugin-transform-dynamic-import', 'babel-plugin-transform-import-meta'],
    });
    return this.transformer;
  },
};

/**
 * Our own modules whose exports a test replaces with jest.spyOn: esbuild's CommonJS exports are
 * getters that cannot be redefined, Babel's can (tests/server/cache-stampede.test.ts spies on
 * deviceRecords to count the reads of concurrent comparisons; the spying file's `import * as`
 * namespace must come from Babel too).
 */
const SPIED_MODULES = [/[\\/]server[\\/]services[\\/]quality\.ts$/, /[\\/]tests[\\/]server[\\/]cache-stampede\.test\.ts$/];

/** `import()` plus a local binding named `require` (see above), or a module a test spies on. */
const needsBabel = (text, file = '') =>
  SPIED_MODULES.some((re) => re.test(file)) || (/\bimport\s*\(/.test(text) && /\b(?:var|let|const)\s+require\b/.test(text));

function loaderOf(file) {
  if (/\.tsx$/.test(file)) return 'tsx';
  if (/\.[cm]?ts$/.test(file)) return 'ts';
  if (/\.jsx$/.test(file)) return 'jsx';
  return 'js';
}

module.exports = {
  getCacheKey(sourceText, sourcePath, options) {
    if (needsBabel(sourceText, sourcePath)) return babel.get().getCacheKey(sourceText, sourcePath, options);
    return crypto.createHash('sha1').update(version).update('\0').update(SELF).update('\0').update(sourcePath).update('\0').update(sourceText).digest('hex');
  },
  process(sourceText, sourcePath, options) {
    if (needsBabel(sourceText, sourcePath)) return babel.get().process(sourceText, sourcePath, options);
    const usesMeta = sourceText.includes('import.meta');
    const result = transformSync(sourceText, {
      loader: loaderOf(sourcePath),
      format: 'cjs',
      target: 'node20',
      sourcemap: 'external',
      sourcesContent: false,
      sourcefile: sourcePath.replace(/\.mjs$/, '.js'),
      supported: { 'dynamic-import': false },
      ...(usesMeta ? { define: IMPORT_META, banner: "var __jestImportMetaUrl = require('node:url').pathToFileURL(__filename).href;" } : {}),
      logLevel: 'silent',
    });
    return { code: result.code, map: result.map };
  },
};
