import { PhysicsCurve } from '@/components/physics-curve';
import { QueryState } from '@/components/query-state';
import { useCurvePhysics } from '@/lib/api/physics';

/** The physics of curve `id` (loading, error and empty states around PhysicsCurve). */
export function PhysicsCurveSection({ id, wide }: { id: string; wide: boolean }) {
  const physics = useCurvePhysics(id);
  return (
    <QueryState query={physics}>
      {(p) => <PhysicsCurve p={p} wide={wide} />}
    </QueryState>
  );
}
