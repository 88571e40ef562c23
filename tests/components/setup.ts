/**
 * The components project's time limit per test: 30 s instead of jest's 5 s. A file's first test
 * renders first, and React Native's modules that load on first use go through Babel then; on a
 * fresh clone (empty transform cache), on two cores shared with the browser lane, that once took
 * over 5 s (tests/components/batch-form.test.tsx, 3 December 2026).
 */
jest.setTimeout(30_000);
