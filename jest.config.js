/**
 * Four jest projects:
 *  - lib:        pure TypeScript (the I-V engine, physics, quality rules, CLI)
 *  - server:     Express + PGlite + better-auth through supertest (ESM-only packages transformed)
 *  - components: React Native components through the jest-expo preset
 *  - e2e:        headless Chromium against the real server (run by scripts/test.ts after the web export)
 */
// TypeScript and the ES-module packages through esbuild (see the file for why not Babel).
const nodeTransform = '<rootDir>/tests/support/esbuild-transform.js';

const esmPackages = [
  'better-auth', '@better-auth', 'better-call', 'jose', 'nanostores', '@noble', 'rou3', 'uncrypto',
  '@electric-sql/pglite', 'ml-levenberg-marquardt', 'ml-matrix', 'ml-array-[^/]+', 'is-any-array',
  'drizzle-orm', 'defu', 'kysely', '@standard-schema', 'zod', 'mathjs', 'fraction.js', 'decimal.js',
  'complex.js', 'typed-function', 'javascript-natural-sort', 'escape-latex', 'seedrandom', 'tiny-emitter',
  'fast-check', 'pure-rand', 'nodemailer',
];

const nodeProject = (name, roots) => ({
  displayName: name,
  testEnvironment: 'node',
  roots,
  testMatch: ['**/*.test.ts'],
  transform: { '\\.[cm]?[jt]sx?$': nodeTransform },
  transformIgnorePatterns: [`/node_modules/(?!(${esmPackages.join('|')})/)`],
  // mathjs on first use (tests/support/mathjs-on-first-use.js says why).
  moduleNameMapper: { '^mathjs$': '<rootDir>/tests/support/mathjs-on-first-use.js', '^@/(.*)$': '<rootDir>/$1' },
  moduleFileExtensions: ['ts', 'tsx', 'js', 'mjs', 'cjs', 'json'],
});

module.exports = {
  projects: [
    nodeProject('lib', ['<rootDir>/tests/lib', '<rootDir>/tests/cli']),
    { ...nodeProject('server', ['<rootDir>/tests/server', '<rootDir>/tests/robustness']), setupFilesAfterEnv: ['<rootDir>/tests/server/setup.ts'] },
    { ...nodeProject('e2e', ['<rootDir>/tests/e2e']), setupFilesAfterEnv: ['<rootDir>/tests/e2e/setup.ts'] },
    {
      displayName: 'components',
      // The native preset, not jest-expo/web: @testing-library/react-native queries host 'Text' and
      // 'TextInput' elements, which react-native-web replaces with <div>/<input>, and jest-expo/web's
      // merged moduleNameMapper still resolves 'react-native' to the native package without its mocks.
      preset: 'jest-expo',
      roots: ['<rootDir>/tests/components'],
      setupFilesAfterEnv: ['<rootDir>/tests/components/setup.ts'],
      testMatch: ['**/*.test.tsx'],
      // The screens' charts load on first use in the browser (components/lazy-charts.tsx, a dynamic
      // import that jest's module system does not run); here they are the charts themselves.
      moduleNameMapper: { '^@/components/lazy-charts$': '<rootDir>/components/charts', '^@/(.*)$': '<rootDir>/$1' },
      transformIgnorePatterns: [
        'node_modules/(?!((jest-)?react-native|@react-native(-community)?|expo(nent)?|@expo(nent)?/.*|@expo-google-fonts/.*|react-navigation|@react-navigation/.*|react-native-svg|victory.*|@tanstack/.*|standard-navigation))',
      ],
    },
  ],
};
