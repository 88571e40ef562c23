/** The differences between two versions of an acceptance spec, in words, for its version history. */
import type { ParamKey } from '@/lib/quality/params';
import { flagLabel } from '@/lib/quality/reason-text';
import type { Spec } from '@/lib/quality/spec';
import { formatValue, labelOf } from '@/lib/vocabulary';

/**
 * What changed from `before` (null for a first version) to `after`, one sentence each, in the
 * key table's labels and the screens' units: "Rs: up to 0.6 Ω → up to 0.5 Ω", "FF: from 70.0 % →
 * from 75.0 %".
 */
export function describeChanges(before: Spec | null, after: Spec): string[] {
  if (!before) return ['first version'];
  const out: string[] = [];
  if (before.name !== after.name) out.push(`renamed from “${before.name}”`);
  const keys = new Set([...Object.keys(before.limits ?? {}), ...Object.keys(after.limits ?? {})]) as Set<ParamKey>;
  for (const k of keys) {
    const a = before.limits?.[k];
    const b = after.limits?.[k];
    const v = (x: number) => formatValue(k, x, 6);
    const show = (l?: { min?: number; max?: number }) =>
      !l ? 'no limit' : l.min !== undefined && l.max !== undefined ? `${v(l.min)} … ${v(l.max)}` : l.min !== undefined ? `from ${v(l.min)}` : l.max !== undefined ? `up to ${v(l.max)}` : 'no limit';
    if (JSON.stringify(a ?? null) !== JSON.stringify(b ?? null)) out.push(`${labelOf(k)}: ${show(a)} → ${show(b)}`);
  }
  if (JSON.stringify(before.power_classes ?? null) !== JSON.stringify(after.power_classes ?? null)) out.push('power classes changed');
  const fa = [...(before.fail_flags ?? [])].sort().map(flagLabel).join(', ');
  const fb = [...(after.fail_flags ?? [])].sort().map(flagLabel).join(', ');
  if (fa !== fb) out.push(`failing flags: ${fa || 'none'} → ${fb || 'none'}`);
  if ((before.notes ?? '') !== (after.notes ?? '')) out.push('notes changed');
  if ((before.decision_rule ?? 'simple') !== (after.decision_rule ?? 'simple')) out.push(`decision rule: ${before.decision_rule ?? 'simple'} → ${after.decision_rule ?? 'simple'}`);
  if (JSON.stringify(before.nameplate_limits ?? null) !== JSON.stringify(after.nameplate_limits ?? null)) out.push('limits relative to the nameplate changed');
  return out.length ? out : ['saved without changes'];
}
