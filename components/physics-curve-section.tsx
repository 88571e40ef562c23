import { useState } from 'react';
import { PhysicsCurve } from '@/components/physics-curve';
import { QueryState } from '@/components/query-state';
import { useSettled } from '@/components/use-settled';
import { useCurvePhysics } from '@/lib/api/physics';
import { VOC_RANGE_C } from '@/lib/schemas/physics';
import { checkRange } from '@/lib/schemas/physics-form';

/**
 * The physics of curve `id` (loading, error and empty states around PhysicsCurve), with the
 * temperature range of its Voc chart: a range that is not valid is said at its field and the
 * chart is not drawn for it.
 */
export function PhysicsCurveSection({ id, wide }: { id: string; wide: boolean }) {
  const [from, setFrom] = useState('');
  const [to, setTo] = useState('');
  const checked = checkRange(from, to, '°C', VOC_RANGE_C);
  const range = useSettled(checked.range ? { from_c: checked.range.from, to_c: checked.range.to } : null);
  const physics = useCurvePhysics(id, range);
  return (
    <QueryState query={physics}>
      {(p) => <PhysicsCurve p={p} wide={wide} range={{ from, to, onFrom: setFrom, onTo: setTo, errors: checked.errors, valid: checked.range !== null }} />}
    </QueryState>
  );
}
