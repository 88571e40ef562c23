import { Redirect, useLocalSearchParams } from 'expo-router';
import { useWindowDimensions } from 'react-native';
import { PhysicsCurveSection } from '@/components/physics-curve-section';
import { PhysicsExplorer } from '@/components/physics-explorer';
import { Screen } from '@/components/screen';
import { theme } from '@/components/theme';
import { useMe } from '@/lib/api/session';
import { can } from '@/lib/auth/roles';

/** Device physics: a curve's physics when ?curve=<id> is given, and the carrier-statistics explorer. */
export default function PhysicsScreen() {
  const me = useMe();
  const params = useLocalSearchParams<{ curve?: string }>();
  const curveId = typeof params.curve === 'string' && params.curve ? params.curve : null;
  const { width } = useWindowDimensions();
  const wide = width >= theme.wideFrom;
  if (me.data && !can(me.data.role, 'physics:use')) return <Redirect href="/" />;
  return (
    <Screen
      title="Device physics"
      subtitle="Crystalline silicon: carrier statistics (Fermi–Dirac, Boltzmann beside it), quasi-Fermi levels and what a fitted curve says about its recombination."
      testID="physics-screen"
    >
      {curveId ? <PhysicsCurveSection id={curveId} wide={wide} /> : null}
      <PhysicsExplorer wide={wide} />
    </Screen>
  );
}
