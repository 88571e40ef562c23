/**
 * Decision rules and limits relative to the nameplate: how a value with its expanded uncertainty
 * is judged against a limit, and how a spec's nameplate-relative limits and power classes become
 * watts for one device.
 *
 * Decision rules as ILAC-G8:09/2019 describes them and the trade uses them:
 *  - "simple" (simple acceptance, shared risk): pass when the value meets the limit; the
 *    uncertainty is reported beside it. Bounds are inclusive.
 *  - "guard_band": the acceptance limit is the tolerance limit moved inwards by the guard band
 *    w = U (k = 2), so a device passes only when its value meets the limit by at least its
 *    expanded uncertainty: value − U ≥ min and value + U ≤ max ("binary statement with guard
 *    band", ILAC-G8 §4.2.2, w = U). A value that meets the limit but not by U fails.
 * A parameter without an uncertainty (none in the budget, no setup) is judged with U = 0 under
 * either rule.
 * A device is "inside the guard band" of a limit when |value − limit| < U: the measurement cannot
 * tell on which side of the limit the true value lies (ILAC-G8's conditional pass / fail).
 */
import type { FailReason } from '@/lib/quality/evaluate';
import { formatValue, type ParamKey } from '@/lib/quality/params';
import type { LimitSpec, PowerClasses, Spec } from '@/lib/quality/spec';
import { valuePlusMinus } from '@/lib/quality/uncertainty';
import { formatAgainst, labelOf, unitOf } from '@/lib/vocabulary';

export type DecisionRule = 'simple' | 'guard_band';
export const DECISION_RULES: readonly DecisionRule[] = ['simple', 'guard_band'];

/** The rule in words, for reasons, screens and exports. */
export const DECISION_RULE_WORDS: Record<DecisionRule, string> = {
  simple: 'simple acceptance: pass when the value meets the limit, uncertainty reported beside it',
  guard_band: 'guard band: pass only when the value meets the limit by at least its expanded uncertainty (k = 2)',
};

/** The spec's rule (simple when the spec does not say). */
export function ruleOf(spec: Pick<Spec, 'decision_rule'>): DecisionRule {
  return spec.decision_rule ?? 'simple';
}

/** "Pmax 287.0 ± 8.8 W", "FF 71.3 %" — a stored value with its uncertainty in the shown unit. */
export function valueWords(key: ParamKey, v: number, u: number | null | undefined): string {
  const unit = unitOf(key);
  const isFraction = key === 'ff' || key === 'efficiency';
  const shown = isFraction ? v * 100 : v;
  const text = u && u > 0 ? valuePlusMinus(shown, isFraction ? u * 100 : u) : String(Number(shown.toPrecision(6)));
  return `${labelOf(key)} ${text}${unit ? ` ${unit}` : ''}`;
}

function boundWords(key: ParamKey, b: number): string {
  const unit = unitOf(key);
  const shown = key === 'ff' || key === 'efficiency' ? b * 100 : b;
  return `${formatValue(shown)}${unit ? ` ${unit}` : ''}`;
}

/**
 * The reasons a value fails its limits under the rule (empty when it passes), each saying which
 * rule failed it. `u` is the value's expanded uncertainty in its stored unit (null: none).
 */
export function limitReasons(key: ParamKey, v: number, u: number | null | undefined, lim: LimitSpec, rule: DecisionRule, nameplateNote = ''): FailReason[] {
  const out: FailReason[] = [];
  const band = rule === 'guard_band' && u && u > 0 ? u : 0;
  const ruleNote = rule === 'guard_band' ? 'guard-band rule' : 'simple rule';
  // Without an uncertainty, value and limit get as many digits as it takes to tell them apart
  // ("Voc 42.001 V is above the maximum 42 V", lib/vocabulary.ts formatAgainst).
  const edges = [lim.min, lim.max].filter((x): x is number => x !== undefined);
  const apart = formatAgainst(key, v, edges);
  const plain = !(u && u > 0);
  const said = plain ? `${labelOf(key)} ${apart.value}` : valueWords(key, v, u);
  const boundText = (b: number) => (plain ? apart.limits[edges.indexOf(b)] : boundWords(key, b));
  if (lim.min !== undefined) {
    const bound = `${boundText(lim.min)}${nameplateNote}`;
    if (v < lim.min) {
      out.push({ kind: 'below_min', param: key, value: v, limit: 'min', bound: lim.min, message: `${said} is below the minimum ${bound} (${ruleNote})` });
    } else if (v - band < lim.min) {
      out.push({ kind: 'inside_guard_band', param: key, value: v, limit: 'min', bound: lim.min, message: `${said} does not clear the minimum ${bound} by its uncertainty (${ruleNote})` });
    }
  }
  if (lim.max !== undefined) {
    const bound = `${boundText(lim.max)}${nameplateNote}`;
    if (v > lim.max) {
      out.push({ kind: 'above_max', param: key, value: v, limit: 'max', bound: lim.max, message: `${said} is above the maximum ${bound} (${ruleNote})` });
    } else if (v + band > lim.max) {
      out.push({ kind: 'inside_guard_band', param: key, value: v, limit: 'max', bound: lim.max, message: `${said} does not stay below the maximum ${bound} by its uncertainty (${ruleNote})` });
    }
  }
  return out;
}

/** True when the value lies within its expanded uncertainty of either limit (|v − limit| < U). */
export function insideGuardBand(v: number, u: number | null | undefined, lim: LimitSpec): boolean {
  if (!u || !(u > 0)) return false;
  return (lim.min !== undefined && Math.abs(v - lim.min) < u) || (lim.max !== undefined && Math.abs(v - lim.max) < u);
}

/** A limit relative to the nameplate: below/above it by W or by % of it (one of each side at most). */
export type NameplateLimit = { below_w?: number; above_w?: number; below_pct?: number; above_pct?: number };

/** The parameters a nameplate-relative limit may be written for. */
export const NAMEPLATE_PARAMS = ['pmp_w', 'stc_pmp_w'] as const;

/** A nameplate-relative limit in watts for a nameplate (the stricter with an absolute limit is applied by `limitsFor`). */
export function nameplateLimit(rel: NameplateLimit, nameplate_w: number): LimitSpec {
  const min = rel.below_w !== undefined ? nameplate_w - rel.below_w : rel.below_pct !== undefined ? nameplate_w * (1 - rel.below_pct / 100) : undefined;
  const max = rel.above_w !== undefined ? nameplate_w + rel.above_w : rel.above_pct !== undefined ? nameplate_w * (1 + rel.above_pct / 100) : undefined;
  return { ...(min !== undefined ? { min } : {}), ...(max !== undefined ? { max } : {}) };
}

/** "nameplate − 0 W", "nameplate + 3 %": one side of a relative limit in words. */
export function nameplateSideWords(rel: NameplateLimit, side: 'min' | 'max'): string | null {
  const w = side === 'min' ? rel.below_w : rel.above_w;
  const pct = side === 'min' ? rel.below_pct : rel.above_pct;
  const sign = side === 'min' ? '−' : '+';
  if (w !== undefined) return `nameplate ${sign} ${formatValue(w)} W`;
  if (pct !== undefined) return `nameplate ${sign} ${formatValue(pct)} %`;
  return null;
}

/** The whole relative limit in words: "at least nameplate − 0 W and at most nameplate + 5 W". */
export function nameplateLimitWords(key: ParamKey, rel: NameplateLimit): string {
  const lo = nameplateSideWords(rel, 'min');
  const hi = nameplateSideWords(rel, 'max');
  const parts = [lo ? `at least ${lo}` : null, hi ? `at most ${hi}` : null].filter(Boolean);
  return `${labelOf(key)} ${parts.join(' and ')}`;
}

/** Combines two limits, keeping the stricter bound of each side. */
function stricter(a: LimitSpec | undefined, b: LimitSpec): LimitSpec {
  const min = a?.min === undefined ? b.min : b.min === undefined ? a.min : Math.max(a.min, b.min);
  const max = a?.max === undefined ? b.max : b.max === undefined ? a.max : Math.min(a.max, b.max);
  return { ...(min !== undefined ? { min } : {}), ...(max !== undefined ? { max } : {}) };
}

export type ResolvedLimits = {
  limits: Partial<Record<ParamKey, LimitSpec>>;
  /** Per parameter, " (nameplate − 0 W of 300 W)" to add after a bound that came from the nameplate. */
  notes: Partial<Record<ParamKey, string>>;
  /** Parameters whose nameplate-relative limit cannot be applied: no nameplate known. */
  missingNameplate: ParamKey[];
};

/**
 * The spec's limits for one device in watts: absolute limits, plus the nameplate-relative ones
 * resolved against the device's nameplate (its own, else the batch's); where both bind a side,
 * the stricter one applies.
 */
export function limitsFor(spec: Pick<Spec, 'limits' | 'nameplate_limits'>, nameplate_w: number | null | undefined): ResolvedLimits {
  const limits: Partial<Record<ParamKey, LimitSpec>> = { ...(spec.limits ?? {}) };
  const notes: Partial<Record<ParamKey, string>> = {};
  const missingNameplate: ParamKey[] = [];
  for (const key of NAMEPLATE_PARAMS) {
    const rel = spec.nameplate_limits?.[key];
    if (!rel) continue;
    if (!(typeof nameplate_w === 'number' && nameplate_w > 0)) {
      missingNameplate.push(key);
      continue;
    }
    const abs = nameplateLimit(rel, nameplate_w);
    limits[key] = stricter(limits[key], abs);
    notes[key] = ` (${[nameplateSideWords(rel, 'min'), nameplateSideWords(rel, 'max')].filter(Boolean).join(', ')} of ${formatValue(nameplate_w)} W)`;
  }
  return { limits, notes, missingNameplate };
}

/** A power class around the nameplate: from ≤ offset < to, in W or in % of the nameplate. */
export type NameplateBin = { label: string; from_w?: number; to_w?: number; from_pct?: number; to_pct?: number };

/** Bins around the nameplate in watts for one nameplate (explicit bins of `powerClassOf`). */
export function resolvePowerClasses(pc: PowerClasses, nameplate_w: number | null | undefined): PowerClasses | null {
  if (!pc.nameplate_bins) return pc;
  if (!(typeof nameplate_w === 'number' && nameplate_w > 0)) return null;
  const at = (w: number | undefined, pct: number | undefined) => (w !== undefined ? nameplate_w + w : nameplate_w * (1 + (pct ?? 0) / 100));
  return {
    basis: pc.basis,
    bins: pc.nameplate_bins.map((b) => ({ label: b.label, nominal_w: nameplate_w, min_w: at(b.from_w, b.from_pct), max_w: at(b.to_w, b.to_pct) })),
  };
}

/** "the nameplate", "nameplate + 5 W", "nameplate − 2.5 %": one end of a bin around the nameplate. */
export function nameplateOffsetWords(x: number, unit: 'w' | 'pct'): string {
  if (x === 0) return 'the nameplate';
  return `nameplate ${x < 0 ? '−' : '+'} ${formatValue(Math.abs(x))} ${unit === 'w' ? 'W' : '%'}`;
}

/**
 * "Class B: Pmax at STC at least the nameplate and below nameplate + 5 W" — a bin around the
 * nameplate in words (from ≤ power − nameplate < to); `basis` names the classed power.
 */
export function nameplateBinWords(b: NameplateBin, basis?: 'pmp_w' | 'stc_pmp_w'): string {
  const end = (w: number | undefined, pct: number | undefined) => (w !== undefined ? nameplateOffsetWords(w, 'w') : nameplateOffsetWords(pct ?? 0, 'pct'));
  const label = /^class\b/i.test(b.label) ? b.label : `Class ${b.label}`;
  return `${label}: ${labelOf(basis ?? 'pmp_w')} at least ${end(b.from_w, b.from_pct)} and below ${end(b.to_w, b.to_pct)}`;
}
