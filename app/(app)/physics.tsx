import { Redirect, useLocalSearchParams, useRouter } from 'expo-router';
import { useWindowDimensions } from 'react-native';
import { PhysicsBatchSection } from '@/components/physics-batch-section';
import { PhysicsCurveSection } from '@/components/physics-curve-section';
import { PhysicsExplorer } from '@/components/physics-explorer';
import { Screen } from '@/components/screen';
import { theme } from '@/components/theme';
import { Txt } from '@/components/txt';
import { useMe } from '@/lib/api/session';
import { can } from '@/lib/auth/roles';

/**
 * Device physics. It opens on the person's own devices (a batch, ?batch=<id>, the newest by
 * default: J0 and implied Voc per device); a curve's physics when ?curve=<id> is given; the
 * carrier-statistics calculators below.
 */
export default function PhysicsScreen() {
  const me = useMe();
  const router = useRouter();
  const params = useLocalSearchParams<{ curve?: string; batch?: string }>();
  const curveId = typeof params.curve === 'string' && params.curve ? params.curve : null;
  const batchId = typeof params.batch === 'string' && params.batch ? params.batch : null;
  const { width } = useWindowDimensions();
  const wide = width >= theme.wideFrom;
  if (me.data && !can(me.data.role, 'physics:use')) return <Redirect href="/" />;
  return (
    <Screen
      title="Device physics"
      subtitle="Your devices’ saturation current and implied Voc, what one fitted curve says about its recombination, and carrier statistics of crystalline silicon (Fermi–Dirac, Boltzmann beside it)."
      testID="physics-screen"
    >
      {curveId ? <PhysicsCurveSection id={curveId} wide={wide} /> : null}
      <PhysicsBatchSection wide={wide} batchId={batchId} onBatch={(id) => router.setParams({ batch: id })} />
      <Txt variant="heading" accessibilityRole="header" style={{ marginTop: 8 }} testID="physics-calculators">
        Calculators: silicon at any doping, injection and temperature
      </Txt>
      <PhysicsExplorer wide={wide} />
    </Screen>
  );
}
