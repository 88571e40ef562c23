/**
 * The one-vocabulary check for JSON that leaves the process (API answers, CLI output): every
 * object key must be snake_case (`/^[a-z][a-z0-9]*(_[a-z0-9]+)*$/`). Objects that are maps keyed
 * by data (batch ids, power-class labels, flag codes) are named explicitly by the key that holds
 * them; their own keys are not words of the vocabulary, but what they hold is still walked.
 */
export const SNAKE_CASE = /^[a-z][a-z0-9]*(_[a-z0-9]+)*$/;

/**
 * Keys whose value is a map keyed by data, with what the data is:
 * power_class_counts (class labels such as "P400"), and in a comparison `stats` and `counts`
 * keyed by batch id. Kept short on purpose: a new entry needs a reason.
 */
export const DATA_MAP_KEYS: ReadonlySet<string> = new Set(['power_class_counts', 'stats', 'counts']);

/** "$.a.b[0].c" paths of every key that is not snake_case (data maps' own keys excepted). */
export function nonSnakeKeys(value: unknown, at = '$', out: string[] = [], dataMap = false): string[] {
  if (Array.isArray(value)) {
    value.forEach((v, i) => nonSnakeKeys(v, `${at}[${i}]`, out));
    return out;
  }
  if (value === null || typeof value !== 'object') return out;
  for (const [key, v] of Object.entries(value)) {
    if (!dataMap && !SNAKE_CASE.test(key)) out.push(`${at}.${key}`);
    nonSnakeKeys(v, `${at}.${key}`, out, !dataMap && DATA_MAP_KEYS.has(key));
  }
  return out;
}
