/**
 * The release report's content (GET /api/batches/:id/report.pdf), independent of how it is drawn:
 * the limit lines in words, the counts, the devices' rows and the histograms of Pmax and FF with
 * the spec's limits. Pure; server/services/report.ts gathers the inputs, report-pdf.ts draws.
 */
import { nameplateBinWords } from '@/lib/quality/decision-rules';
import { nameplateText } from '@/lib/quality/reason-text';
import type { Spec } from '@/lib/quality/spec';
import { formatValue, labelOf, toShown, unitOf } from '@/lib/vocabulary';

export type ReportDevice = {
  device_id: string;
  result: 'pass' | 'fail';
  reasons: string[];
  power_class: string | null;
  pmp_w: number | null;
  ff: number | null;
};

export type Histogram = {
  key: 'pmp_w' | 'ff';
  /** Axis title with the shown unit. */
  title: string;
  /** Bin edges in the shown unit (FF in %), one more than `counts`. */
  edges: number[];
  counts: number[];
  /** The spec's limits in the shown unit; null where none. */
  min: number | null;
  max: number | null;
  /** Devices without a value. */
  missing: number;
};

/** "Pmax ≥ 400.0 W", "FF between 70.0 % and 85.0 %" — one line per limited parameter. */
export function limitLines(spec: Pick<Spec, 'limits'>): string[] {
  return Object.entries(spec.limits ?? {}).flatMap(([key, l]) => {
    if (!l) return [];
    const name = labelOf(key);
    if (l.min !== undefined && l.max !== undefined) return [`${name} between ${formatValue(key, l.min)} and ${formatValue(key, l.max)}`];
    if (l.min !== undefined) return [`${name} at least ${formatValue(key, l.min)}`];
    return [`${name} at most ${formatValue(key, l.max)}`];
  });
}

/**
 * Equal-width bins over the values and the limits together (so each limit line falls inside the
 * drawing), `bins` of them (Sturges' rule, ⌈log2 n⌉ + 1, common practice, when not given).
 */
export function histogram(key: 'pmp_w' | 'ff', values: (number | null)[], limits: { min?: number; max?: number } | undefined, bins?: number): Histogram {
  const shown = values.map((v) => toShown(key, v)).filter((v): v is number => v !== null && Number.isFinite(v));
  const min = limits?.min !== undefined ? toShown(key, limits.min) : null;
  const max = limits?.max !== undefined ? toShown(key, limits.max) : null;
  const title = `${labelOf(key)} (${unitOf(key)})`;
  const missing = values.length - shown.length;
  const all = [...shown, ...(min !== null ? [min] : []), ...(max !== null ? [max] : [])];
  if (!all.length) return { key, title, edges: [], counts: [], min, max, missing };
  let lo = Math.min(...all);
  let hi = Math.max(...all);
  if (hi - lo < 1e-9 * Math.max(1, Math.abs(hi))) {
    lo -= 0.5;
    hi += 0.5;
  }
  const n = Math.max(1, Math.min(40, bins ?? Math.ceil(Math.log2(Math.max(1, shown.length))) + 1));
  const width = (hi - lo) / n;
  const edges = Array.from({ length: n + 1 }, (_, k) => lo + k * width);
  const counts = new Array<number>(n).fill(0);
  for (const v of shown) counts[Math.min(n - 1, Math.floor((v - lo) / width))] += 1;
  return { key, title, edges, counts, min, max, missing };
}

/** Devices per power class, largest class label first as given; devices without a class apart. */
export function powerClassCounts(devices: ReportDevice[]): { label: string; count: number }[] {
  const by = new Map<string, number>();
  for (const d of devices) by.set(d.power_class ?? 'no class', (by.get(d.power_class ?? 'no class') ?? 0) + 1);
  return [...by.entries()].map(([label, count]) => ({ label, count })).sort((a, b) => (a.label === 'no class' ? 1 : b.label === 'no class' ? -1 : a.label.localeCompare(b.label, 'en', { numeric: true })));
}

/** Flag codes of the batch's curves with how many curves raised each, most frequent first. */
export function flagCounts(flags: { code: string; message: string }[][]): { code: string; message: string; count: number }[] {
  const by = new Map<string, { code: string; message: string; count: number }>();
  for (const list of flags) {
    for (const code of new Set(list.map((f) => f.code))) {
      const f = list.find((x) => x.code === code)!;
      const e = by.get(code) ?? { code, message: f.message, count: 0 };
      e.count += 1;
      by.set(code, e);
    }
  }
  return [...by.values()].sort((a, b) => b.count - a.count || a.code.localeCompare(b.code));
}

const NUM = '(-?\\d+(?:\\.\\d+)?(?:e[-+]?\\d+)?)';
const LIMIT_REASON = new RegExp(`^([a-z][a-z0-9_]*) ${NUM}(?: \\S+)? is (below|above) the (minimum|maximum) ${NUM}(?: \\S+)?$`, 'i');

/**
 * A reason of the spec engine (lib/quality/evaluate.ts, kept verbatim in release records:
 * "ff 0.45978 is below the minimum 0.6") in a reader's words with shown units
 * ("FF 46.0 % is below the minimum 60.0 %"); other reasons unchanged but for their first letter.
 */
export function reasonInWords(message: string): string {
  const m = LIMIT_REASON.exec(message);
  if (m && labelOf(m[1]) !== m[1]) return `${labelOf(m[1])} ${formatValue(m[1], Number(m[2]))} is ${m[3]} the ${m[4]} ${formatValue(m[1], Number(m[5]))}`;
  const missing = /^([a-z][a-z0-9_]*) not measured(.*)$/i.exec(message);
  if (missing && labelOf(missing[1]) !== missing[1]) return `${labelOf(missing[1])} not measured${missing[2]}`;
  return message.charAt(0).toUpperCase() + message.slice(1);
}

/**
 * What the spec's power classes mean, one line each, so a count of "P405: 12" can be read without
 * the spec: the steps with their tolerance and the lowest and highest class offered, or each bin's
 * edges in watts, or each bin around the nameplate (in watts for the batch's nameplate when known).
 * Empty when the spec has no power classes.
 */
export function powerClassLines(pc: Spec['power_classes'], nameplate_w?: number | null): string[] {
  if (!pc) return [];
  const basis = pc.basis ?? 'pmp_w';
  const power = labelOf(basis);
  const w = (x: number) => `${nameplateText(x)} W`;
  if (pc.nameplate_bins) {
    const head = `Classed on ${power} around the batch's nameplate power${nameplate_w ? ` (${w(nameplate_w)})` : ''}; a device outside every class has none and fails.`;
    return [
      head,
      ...pc.nameplate_bins.map((b) => {
        const words = nameplateBinWords(b, basis);
        if (!nameplate_w) return words;
        const edge = (x: number | undefined, pct: number | undefined) => (x !== undefined ? nameplate_w + x : nameplate_w * (1 + (pct ?? 0) / 100));
        return `${words} (${w(Number(edge(b.from_w, b.from_pct).toFixed(3)))} to below ${w(Number(edge(b.to_w, b.to_pct).toFixed(3)))})`;
      }),
    ];
  }
  if (pc.bins) {
    return [
      `Classed on ${power}; a device outside every class has none and fails.`,
      ...pc.bins.map((b) => `${/^class\b/i.test(b.label) ? b.label : `Class ${b.label}`} (nominal ${w(b.nominal_w)}): ${power} at least ${w(b.min_w)} and below ${w(b.max_w)}`),
    ];
  }
  if (pc.step_w === undefined) return [];
  const prefix = pc.label_prefix ?? 'P';
  const minus = pc.tolerance?.minus_w ?? 0;
  const plus = pc.tolerance?.plus_w ?? pc.step_w;
  const lines = [
    `Classes every ${w(pc.step_w)} named ${prefix} and the class power: a device is in class ${prefix}N when N${minus ? ` − ${w(minus)}` : ''} ≤ ${power} < N + ${w(plus)}.`,
  ];
  if (pc.lowest_w !== undefined) lines.push(`The lowest class is ${prefix}${nameplateText(pc.lowest_w)}; a device below it has no class and fails.`);
  if (pc.highest_w !== undefined) lines.push(`The highest class is ${prefix}${nameplateText(pc.highest_w)}; a device above it gets that class.`);
  return lines;
}
