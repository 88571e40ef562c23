/**
 * A device's worst severity, the one word the batch screens colour and count it by: the batch
 * overlay chart (only warn and fail coloured), the device cards and the table's result column.
 *
 * - With the batch's spec (that of its last review decision): a device the spec fails is `fail`;
 *   a device the spec passes is `warn` when a flag asks for a look (severity warn or fail), else
 *   `pass`. The spec decides what fails — a flag the spec does not list in `fail_flags` cannot
 *   overrule it, it only warns.
 * - Without a spec: the worst of the flags' own severities (info counts as pass).
 */

export const SEVERITIES = ['pass', 'warn', 'fail'] as const;
export type Severity = (typeof SEVERITIES)[number];

/** Words for a severity, as the screens show it. */
export const SEVERITY_WORDS: Record<Severity, string> = { pass: 'Pass', warn: 'Warning', fail: 'Fail' };

const RANK: Record<Severity, number> = { pass: 0, warn: 1, fail: 2 };

/** The worst of the flags' severities; info (or no flag) is pass. */
export function flagSeverity(flags: readonly { severity: string }[]): Severity {
  let worst: Severity = 'pass';
  for (const f of flags) {
    const s: Severity = f.severity === 'fail' ? 'fail' : f.severity === 'warn' ? 'warn' : 'pass';
    if (RANK[s] > RANK[worst]) worst = s;
  }
  return worst;
}

/** The device's worst severity: the spec's verdict when there is one (flags then only warn), else the flags'. */
export function deviceSeverity(flags: readonly { severity: string }[], specResult: 'pass' | 'fail' | null): Severity {
  if (specResult === 'fail') return 'fail';
  const f = flagSeverity(flags);
  if (specResult === 'pass') return f === 'pass' ? 'pass' : 'warn';
  return f;
}
