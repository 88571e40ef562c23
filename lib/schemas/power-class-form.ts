/**
 * The spec editor's power classes as plain strings: none, nameplate steps, or bins around the
 * batch's nameplate (one row per class, all rows in W or all in % of the nameplate). Turns a
 * spec version into the form and the form back into `power_classes`, with a message per faulty
 * field that names it as the editor labels it ("Power class row 2 (B): from must be below to").
 */
import type { NameplateBin } from '@/lib/quality/decision-rules';
import type { PowerClasses } from '@/lib/quality/spec';
import { readNumber } from '@/lib/schemas/numbers';

export type ClassMode = 'none' | 'steps' | 'nameplate_bins' | 'kept';
export type BinRow = { label: string; from: string; to: string };

export type PowerClassForm = {
  mode: ClassMode;
  step: string;
  basis: 'pmp_w' | 'stc_pmp_w';
  /** One unit for the whole table: W around the nameplate or % of the nameplate. */
  unit: 'w' | 'pct';
  rows: BinRow[];
  /**
   * Classes the editor cannot show (explicit bins in absolute watts, bins around the nameplate
   * that mix W and %): saved again as they were unless another mode is chosen.
   */
  kept?: PowerClasses;
  /**
   * What a steps version may carry besides the step (set through the API): the tolerance, the
   * lowest and highest class, the label prefix. The editor shows them in words and saves them
   * again with the step.
   */
  stepExtras?: Pick<PowerClasses, 'tolerance' | 'lowest_w' | 'highest_w' | 'label_prefix'>;
};

const text = (v: number | undefined) => (v === undefined ? '' : String(v));

/** The form of a spec version's power classes (none for a new spec). */
export function powerClassFormOf(pc?: PowerClasses | null): PowerClassForm {
  // A new spec classes on Pmax at STC; a saved one keeps what it classes on (the engine reads a
  // missing basis as measured Pmax, lib/quality/evaluate.ts), so saving it again changes nothing.
  const basis = pc ? (pc.basis ?? 'pmp_w') : 'stc_pmp_w';
  const base: PowerClassForm = { mode: 'none', step: '', basis, unit: 'w', rows: [] };
  if (!pc) return base;
  const nb = pc.nameplate_bins;
  if (nb?.length) {
    const allW = nb.every((b) => b.from_w !== undefined && b.to_w !== undefined);
    const allPct = nb.every((b) => b.from_pct !== undefined && b.to_pct !== undefined);
    if (allW || allPct) {
      const unit = allW ? 'w' : 'pct';
      const rows = nb.map((b) => ({ label: b.label, from: text(unit === 'w' ? b.from_w : b.from_pct), to: text(unit === 'w' ? b.to_w : b.to_pct) }));
      return { ...base, mode: 'nameplate_bins', unit, rows };
    }
    return { ...base, mode: 'kept', kept: pc };
  }
  if (pc.bins?.length) return { ...base, mode: 'kept', kept: pc };
  if (pc.step_w !== undefined) {
    const { tolerance, lowest_w, highest_w, label_prefix } = pc;
    const extras = Object.fromEntries(Object.entries({ tolerance, lowest_w, highest_w, label_prefix }).filter(([, v]) => v !== undefined));
    return { ...base, mode: 'steps', step: String(pc.step_w), ...(Object.keys(extras).length ? { stepExtras: extras } : {}) };
  }
  return base;
}

/** "+5 W", "−2.5 %", "0 W": one end of a bin as the editor's words show it. */
export function offsetWords(x: number, unit: 'w' | 'pct'): string {
  const sign = x > 0 ? '+' : x < 0 ? '−' : '';
  return `${sign}${Number(Math.abs(x).toPrecision(6))} ${unit === 'w' ? 'W' : '%'}`;
}

/** How the editor names row i (0-based) in messages: "Power class row 2 (B)". */
export function rowName(i: number, label: string): string {
  return `Power class row ${i + 1}${label.trim() ? ` (${label.trim()})` : ''}`;
}

export type ClassFields = { power_classes?: PowerClasses; problems: string[] };

/**
 * `power_classes` of the form, or the problems that stop it being saved, each naming its
 * field. Bins: every row needs a label (unique), a from and a to that are numbers with from
 * below to (in % at least −100), and no two rows may overlap (a class holds from ≤ offset < to,
 * so one row may start where another ends).
 */
export function powerClassFields(f: PowerClassForm): ClassFields {
  if (f.mode === 'none') return { problems: [] };
  if (f.mode === 'kept') return { power_classes: f.kept, problems: [] };
  if (f.mode === 'steps') {
    if (!f.step.trim()) return { problems: ['Power class step (W): give the step between nameplates, e.g. 5'] };
    const step = readNumber(f.step);
    if (step === undefined || Number.isNaN(step)) return { problems: [`Power class step (W) must be a number (not "${f.step.trim()}")`] };
    if (!(step > 0)) return { problems: ['Power class step (W) must be above 0 W'] };
    return { power_classes: { step_w: step, basis: f.basis, ...f.stepExtras }, problems: [] };
  }
  const problems: string[] = [];
  if (!f.rows.length) return { problems: ['Power classes around the nameplate: add at least one row'] };
  const unitWord = f.unit === 'w' ? 'W' : '%';
  const read: { i: number; label: string; from: number; to: number }[] = [];
  const seen = new Map<string, number>();
  f.rows.forEach((r, i) => {
    const name = rowName(i, r.label);
    const label = r.label.trim();
    if (!label) problems.push(`${name} label: give the class a label, e.g. A`);
    else if (label.length > 40) problems.push(`${name} label is at most 40 characters`);
    else if (seen.has(label)) problems.push(`${name} label "${label}" is already used by row ${seen.get(label)! + 1}`);
    if (label) seen.set(label, seen.get(label) ?? i);
    const ends = (['from', 'to'] as const).map((side) => {
      const raw = r[side];
      const n = readNumber(raw);
      if (n === undefined) problems.push(`${name} ${side} (${unitWord}): give the ${side === 'from' ? 'lower' : 'upper'} end`);
      else if (Number.isNaN(n)) problems.push(`${name} ${side} (${unitWord}) must be a number (not "${raw.trim()}")`);
      else if (f.unit === 'pct' && n < -100) problems.push(`${name} ${side} (%) must be at least −100 %`);
      else return n;
      return undefined;
    });
    const [from, to] = ends;
    if (from === undefined || to === undefined) return;
    if (from >= to) {
      problems.push(`${name} from (${unitWord}): the lower end ${offsetWords(from, f.unit)} must be below the upper end ${offsetWords(to, f.unit)}`);
      return;
    }
    read.push({ i, label, from, to });
  });
  const sorted = [...read].sort((a, b) => a.from - b.from);
  for (let k = 1; k < sorted.length; k++) {
    const a = sorted[k - 1];
    const b = sorted[k];
    if (b.from < a.to) {
      problems.push(`${rowName(b.i, b.label)} from (${unitWord}): overlaps ${rowName(a.i, a.label).replace('Power class row', 'row')}, which reaches ${offsetWords(a.to, f.unit)}; start it at ${offsetWords(a.to, f.unit)} or later`);
    }
  }
  if (problems.length) return { problems };
  const nameplate_bins: NameplateBin[] = f.rows.map((r) => {
    const from = readNumber(r.from)!;
    const to = readNumber(r.to)!;
    return f.unit === 'w' ? { label: r.label.trim(), from_w: from, to_w: to } : { label: r.label.trim(), from_pct: from, to_pct: to };
  });
  return { power_classes: { basis: f.basis, nameplate_bins } as PowerClasses, problems: [] };
}
