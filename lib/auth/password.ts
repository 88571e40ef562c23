/**
 * The password rule, one for the forms and the server: 12 to 128 characters, and a zxcvbn-ts
 * score of at least 3 of 4 ("safely unguessable", under 10¹⁰ guesses counts as guessable) with
 * the common-password, diceware and English dictionaries. The dictionaries weigh ~0.8 MB
 * compressed, so they are loaded on demand (`loadPasswordChecker`): the web app fetches them
 * only when a password form is open, never in the first-load bundle.
 */
import { ZxcvbnFactory } from '@zxcvbn-ts/core';
import type { ZxcvbnResult } from '@zxcvbn-ts/core';

export const PASSWORD_MIN_LENGTH = 12;
export const PASSWORD_MAX_LENGTH = 128;
/** zxcvbn's scale: 0 too guessable … 4 very unguessable; 3 is the library's recommended floor. */
export const PASSWORD_MIN_SCORE = 3;

/** One sentence for the forms' hint. */
export const PASSWORD_RULE_TEXT = `At least ${PASSWORD_MIN_LENGTH} characters, and not easy to guess (no common words, names, dates or keyboard runs on their own).`;

export type PasswordChecker = { check: (password: string, userInputs?: string[]) => ZxcvbnResult };

let loading: Promise<PasswordChecker> | null = null;

/** The checker with its dictionaries, loaded once (the second caller waits for the first). */
export function loadPasswordChecker(): Promise<PasswordChecker> {
  loading ??= (async () => {
    const [common, en] = await Promise.all([import('@zxcvbn-ts/language-common'), import('@zxcvbn-ts/language-en')]);
    const factory = new ZxcvbnFactory({
      translations: en.translations,
      graphs: common.adjacencyGraphs,
      dictionary: { ...common.dictionary, ...en.dictionary },
    });
    return { check: (password, userInputs = []) => factory.check(password, userInputs) };
  })();
  loading.catch(() => {
    loading = null;
  });
  return loading;
}

/**
 * Why `password` is refused, as a sentence naming the password, or null when it is accepted.
 * `userInputs` (the person's e-mail, its parts and their name) count as easy to guess.
 */
export function passwordProblem(checker: PasswordChecker, password: string, userInputs: string[] = []): string | null {
  if (password.length < PASSWORD_MIN_LENGTH) return `The password needs at least ${PASSWORD_MIN_LENGTH} characters.`;
  if (password.length > PASSWORD_MAX_LENGTH) return `The password may have at most ${PASSWORD_MAX_LENGTH} characters.`;
  const inputs = userInputs.flatMap((s) => [s, ...s.split(/[@.\s_-]+/)]).filter((s) => s.length >= 3);
  const r = checker.check(password, inputs);
  if (r.score >= PASSWORD_MIN_SCORE) return null;
  const why = r.feedback.warning ? ` ${r.feedback.warning.replace(/\.?$/, '.')}` : '';
  const hint = r.feedback.suggestions[0] ? ` ${r.feedback.suggestions[0].replace(/\.?$/, '.')}` : ' Add more words or characters that do not belong together.';
  return `The password is too easy to guess (strength ${r.score} of 4, at least ${PASSWORD_MIN_SCORE} needed).${why}${hint}`;
}
