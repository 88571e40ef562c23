/**
 * The spec editor's form as plain strings, made from a spec version, and the three-way merge that
 * re-applies someone's edits on top of a version saved meanwhile by someone else.
 */
import { PARAM_KEYS } from '@/lib/quality/params';
import type { ParamKey } from '@/lib/quality/params';
import type { Spec } from '@/lib/quality/spec';
import { powerClassFormOf } from '@/lib/schemas/power-class-form';
import type { PowerClassForm } from '@/lib/schemas/power-class-form';

/** Ratios are typed as % in the form and stored as fractions, like the engine. */
export const PERCENT_PARAMS = new Set<ParamKey>(['ff', 'efficiency']);

/** A stored limit as the form shows it ('' for none). */
export const limitToForm = (k: ParamKey, v: number | undefined) => (v == null ? '' : String(PERCENT_PARAMS.has(k) ? Number((v * 100).toPrecision(6)) : v));

/** The editor's fields; the power classes (mode, step, basis, bin rows and their unit) as power-class-form.ts has them. */
export type SpecForm = PowerClassForm & {
  name: string;
  notes: string;
  limits: Record<string, { min: string; max: string }>;
  flags: string[];
};

/** The form of a spec version (empty, with the usual failing flags, for a new spec). */
export function specFormOf(s?: Spec): SpecForm {
  return {
    name: s?.name ?? '',
    notes: s?.notes ?? '',
    limits: Object.fromEntries(PARAM_KEYS.map((k) => [k, { min: limitToForm(k, s?.limits?.[k]?.min), max: limitToForm(k, s?.limits?.[k]?.max) }])),
    ...powerClassFormOf(s?.power_classes),
    flags: s?.fail_flags ?? ['step', 'fit-failed'],
  };
}

/** The power-class part of the editor's form. */
export function classFormOf(f: SpecForm): PowerClassForm {
  return { mode: f.mode, step: f.step, basis: f.basis, unit: f.unit, rows: f.rows, ...(f.kept ? { kept: f.kept } : {}) };
}

/**
 * My edits (`mine` against the `base` they started from) applied on `theirs`, field by field:
 * what I changed wins, everything else comes from theirs. Each limit bound is its own field; the
 * bin rows and their unit are one field (rows in W make no sense under a unit of %), and so are
 * the class mode and the classes kept as saved.
 */
export function mergeSpecForms(base: SpecForm, mine: SpecForm, theirs: SpecForm): SpecForm {
  const pick = <T>(b: T, m: T, t: T) => (JSON.stringify(m) !== JSON.stringify(b) ? m : t);
  const limits = Object.fromEntries(
    Object.keys(theirs.limits).map((k) => [k, { min: pick(base.limits[k]?.min, mine.limits[k]?.min, theirs.limits[k].min) ?? '', max: pick(base.limits[k]?.max, mine.limits[k]?.max, theirs.limits[k].max) ?? '' }]),
  );
  return {
    name: pick(base.name, mine.name, theirs.name),
    notes: pick(base.notes, mine.notes, theirs.notes),
    limits,
    step: pick(base.step, mine.step, theirs.step),
    basis: pick(base.basis, mine.basis, theirs.basis),
    ...pick({ mode: base.mode, kept: base.kept }, { mode: mine.mode, kept: mine.kept }, { mode: theirs.mode, kept: theirs.kept }),
    ...pick({ unit: base.unit, rows: base.rows }, { unit: mine.unit, rows: mine.rows }, { unit: theirs.unit, rows: theirs.rows }),
    // The flags are a set: the order they were ticked in is no change.
    flags: JSON.stringify([...mine.flags].sort()) !== JSON.stringify([...base.flags].sort()) ? mine.flags : theirs.flags,
  };
}
