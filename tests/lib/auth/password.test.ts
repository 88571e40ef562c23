/**
 * The shared password rule (lib/auth/password.ts): length 12–128, zxcvbn-ts score ≥ 3 with the
 * person's own address counted as guessable. Scores are zxcvbn-ts 4.2's with the common and
 * English dictionaries, read off the library in this test's cases (not hand-computed).
 */
import { loadPasswordChecker, passwordProblem, PASSWORD_MIN_SCORE } from '@/lib/auth/password';
import type { PasswordChecker } from '@/lib/auth/password';

let checker: PasswordChecker;
beforeAll(async () => {
  checker = await loadPasswordChecker();
});

it.each([
  ['11 characters, however random', 'Xq7#pL2!vR9', /at least 12 characters/],
  ['129 characters', 'a'.repeat(129), /at most 128 characters/],
  ['a common password padded to length', 'password1234', /too easy to guess.*commonly used/],
  ['a keyboard run', 'qwertyuiop12', /too easy to guess/],
  ['the person’s own address', 'weak@omicron-pv.example', /too easy to guess.*personal/],
])('refuses %s, naming the reason', (_what, password, reason) => {
  expect(passwordProblem(checker, password, ['weak@omicron-pv.example', 'Weak Person'])).toMatch(reason);
});

it.each(['tulip-ledger-carbon-41', 'Flash-line 7 overcast quartz', 'correct-horse-9'])('accepts %s', (password) => {
  expect(passwordProblem(checker, password, ['someone@alpha.example'])).toBeNull();
  expect(checker.check(password).score).toBeGreaterThanOrEqual(PASSWORD_MIN_SCORE);
});

it('the address scores high on its own and low as the person’s own (so the user inputs are used)', () => {
  expect(checker.check('weak@omicron-pv.example').score).toBeGreaterThanOrEqual(PASSWORD_MIN_SCORE);
  expect(passwordProblem(checker, 'weak@omicron-pv.example', [])).toBeNull();
  expect(passwordProblem(checker, 'weak@omicron-pv.example', ['weak@omicron-pv.example'])).not.toBeNull();
});
