/**
 * 'mathjs' as the node test projects load it (jest.config.js moduleNameMapper): the real package,
 * required when one of its exports is first read. Jest has no tree shaking, so requiring mathjs's
 * main entry builds every one of its functions, ~0.8 s of CPU in each test file that imports
 * lib/units.ts (every API test does, through the app), although most never convert a unit.
 * lib/units.ts reads the exports only when it first converts one.
 */
const path = require('node:path');

let real = null;
const load = () => (real ??= require(path.join(path.dirname(require.resolve('mathjs/package.json')), 'lib', 'cjs', 'index.js')));

module.exports = new Proxy(
  {},
  {
    get: (_, key) => (key === '__esModule' ? true : load()[key]),
    has: (_, key) => key in load(),
    ownKeys: () => Reflect.ownKeys(load()),
    getOwnPropertyDescriptor: (_, key) => {
      const d = Object.getOwnPropertyDescriptor(load(), key);
      return d && { ...d, configurable: true };
    },
  },
);
