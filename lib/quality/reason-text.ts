/**
 * The words of a failure reason, as a QA lead reads them: the quantity's label and its value in
 * the unit of the screens, from the key table (lib/vocabulary.ts) — "FF 59.2 % is below the
 * minimum 70.0 %", never "ff 0.592321 is below the minimum 0.7". A value close to its limit gets
 * as many digits as it takes to see why it failed: "Voc 42.001 V is above the maximum 42 V".
 */
import { FLAG_CODES } from '@/lib/iv/flag-codes';
import type { FailReason } from '@/lib/quality/evaluate';
import { formatAgainst, formatValue, labelOf } from '@/lib/vocabulary';

/** "FF 59.2 % is below the minimum 70.0 %" / "Voc 42.001 V is above the maximum 42 V". */
export function limitReason(key: string, value: number, bound: number, side: 'min' | 'max'): string {
  const shown = formatAgainst(key, value, [bound]);
  return `${labelOf(key)} ${shown.value} is ${side === 'min' ? 'below the minimum' : 'above the maximum'} ${shown.limits[0]}`;
}

/** "Pmax at STC was not measured". */
export function notMeasuredReason(key: string): string {
  return `${labelOf(key)} was not measured`;
}

/** "Pmax at STC was not measured, so no power class". */
export function noPowerReason(basis: string): string {
  return `${labelOf(basis)} was not measured, so no power class`;
}

/** The label of a flag code ("Step or second knee …"), the code itself for one the engine does not know. */
export function flagLabel(code: string): string {
  return (FLAG_CODES as Record<string, string>)[code] ?? code;
}

/** "Flag raised: Low shunt resistance; this spec fails it". */
export function flagReason(code: string): string {
  return `Flag raised: ${flagLabel(code)}; this spec fails it`;
}

/** Nameplate text of a step class: 402.5 → "402.5", 400 → "400". */
export function nameplateText(w: number): string {
  return String(Number(w.toFixed(6)));
}

/**
 * The classed power and the edges it is compared with, at a precision that tells them apart:
 * "Pmax at STC 394.99 W" beside a lowest class of 395 W.
 */
export function powerShown(basis: string, power_w: number, edges: readonly number[]): string {
  return `${labelOf(basis)} ${formatAgainst(basis, power_w, edges).value}`;
}

/** "Pmax 431.2 W falls in no power class (the classes cover 400–420 W)". */
export function noClassReason(basis: string, power_w: number, lo: number, hi: number): string {
  return `${powerShown(basis, power_w, [lo, hi])} falls in no power class (the classes cover ${formatValue(basis, lo, 6).replace(/ W$/, '')}–${formatValue(basis, hi, 6)})`;
}

/** "Pmax 392.4 W is below the lowest power class P395". */
export function belowLowestReason(basis: string, power_w: number, edge_w: number, className: string, smallest = false): string {
  return `${powerShown(basis, power_w, [edge_w])} is below the ${smallest ? 'smallest' : 'lowest'} power class ${className}`;
}

/** What a reason is about, without the device's own value: "FF below the minimum 70.0 %". */
export function reasonTopic(r: Pick<FailReason, 'kind' | 'param' | 'value' | 'bound' | 'message'>): string {
  switch (r.kind) {
    case 'below_min':
      return `${labelOf(r.param)} below the minimum ${formatValue(r.param, r.bound)}`;
    case 'above_max':
      return `${labelOf(r.param)} above the maximum ${formatValue(r.param, r.bound)}`;
    case 'not_measured':
      return `${labelOf(r.param)} not measured`;
    case 'power_class':
      return 'no power class';
    case 'flag':
      return `flag: ${flagLabel(String(r.value))}`;
    default:
      // A kind this list does not know yet: its own sentence.
      return r.message;
  }
}

/**
 * The reasons of the failing devices counted by topic, most frequent first: "FF below the minimum
 * 70.0 %: 2 devices". For mails and summaries; `max` topics at most.
 */
export function failureSummary(devices: readonly { result: string; reasons: readonly Pick<FailReason, 'kind' | 'param' | 'value' | 'bound' | 'message'>[] }[], max = 5): string[] {
  const counts = new Map<string, number>();
  for (const d of devices) {
    if (d.result !== 'fail') continue;
    for (const topic of new Set(d.reasons.map(reasonTopic))) counts.set(topic, (counts.get(topic) ?? 0) + 1);
  }
  const sorted = [...counts].sort((a, b) => b[1] - a[1]);
  const lines = sorted.slice(0, max).map(([topic, n]) => `${topic}: ${n} device${n === 1 ? '' : 's'}`);
  if (sorted.length > max) lines.push(`and ${sorted.length - max} more kind${sorted.length - max === 1 ? '' : 's'} of reason`);
  return lines;
}
