import { Txt } from '@/components/txt';
import type { SpecJson } from '@/lib/api/quality';
import { resolvePowerClasses } from '@/lib/quality/decision-rules';
import { formatValue } from '@/lib/quality/params';
import { labelOf } from '@/lib/vocabulary';

/**
 * Beside a batch's power-class counts: the spec's bins around the nameplate in watts for this
 * batch ("around the nameplate 330 W: C 297–313.5 W, …"), or why there are none. Nothing for
 * classes not written around the nameplate.
 */
export function NameplateBinsNote({ spec, nameplate_w }: { spec: SpecJson | undefined; nameplate_w: number | null }) {
  const pc = spec?.power_classes;
  if (!pc?.nameplate_bins) return null;
  const resolved = resolvePowerClasses(pc, nameplate_w);
  const basis = labelOf(pc.basis ?? 'pmp_w');
  return (
    <Txt variant="caption" testID="nameplate-bins-note">
      {resolved?.bins
        ? `Classes around this batch's nameplate ${formatValue(nameplate_w!)} W, on ${basis} (from ≤ power < to): ${resolved.bins.map((b) => `${b.label} ${formatValue(b.min_w)}–${formatValue(b.max_w)} W`).join(', ')}.`
        : `This spec's classes lie around the nameplate, and this batch states no nameplate power: give it one on the batch form to class its devices.`}
    </Txt>
  );
}
