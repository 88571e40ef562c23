import { Link } from 'expo-router';
import { StyleSheet, View, useWindowDimensions } from 'react-native';
import { Card } from '@/components/card';
import { CautionBlock } from '@/components/caution-block';
import { NAV_ITEMS } from '@/components/nav-items';
import { Screen } from '@/components/screen';
import { theme } from '@/components/theme';
import { Txt } from '@/components/txt';
import { ROLE_LABELS } from '@/lib/auth/roles';
import type { Role } from '@/lib/auth/roles';
import { useMe } from '@/lib/api/session';

const ROLE_JOBS: Record<Role, string[]> = {
  test_engineer: [
    'Upload a day’s I-V files from the flash line or the lab, one or many at a time.',
    'Check each curve’s fit and flags; correct temperature, irradiance or cell count and refit.',
    'Submit a finished batch to the QA lead for review.',
  ],
  designer: [
    'Compare batches side by side: key figures, fitted diode parameters, distributions.',
    'Follow a fitted saturation current down to the silicon: n_i, J0, quasi-Fermi-level splitting.',
    'Size strings for the coldest morning from measured modules.',
  ],
  qa_lead: [
    'Own the acceptance limits and power classes as versioned specs.',
    'Review flagged devices and outliers, then release a batch or put it on hold.',
    'Export the pass/fail list that ships with the batch.',
  ],
  admin: [
    'Manage who is in your organisation and what role each person has.',
    'See every message Quasilevel sent: review requests, decisions, password resets.',
  ],
};

export default function Overview() {
  const me = useMe();
  const { width } = useWindowDimensions();
  const wide = width >= theme.wideFrom;
  const d = me.data;
  if (!d) return null;
  const links = NAV_ITEMS.filter((i) => i.match !== '/' && (!i.needs || d.permissions.includes(i.needs)));
  return (
    <Screen title={`Hello, ${d.user.name.split(' ')[0]}`} subtitle={`${ROLE_LABELS[d.role]} at ${d.organization.name}`} testID="overview-screen">
      <View style={[styles.grid, wide && styles.gridWide]}>
        <Card title="Your work here" style={wide ? styles.colWide : undefined}>
          {ROLE_JOBS[d.role].map((j) => (
            <View key={j} style={{ flexDirection: 'row', gap: 8 }}>
              <View style={styles.dot} />
              <Txt variant="body" style={{ flex: 1 }}>{j}</Txt>
            </View>
          ))}
        </Card>
        <Card title="Go to" style={wide ? styles.colNarrow : undefined}>
          {links.map((l) => (
            <Link key={l.match} href={l.href}>
              <Txt variant="body" style={{ color: theme.color.electron, textDecorationLine: 'underline' }}>{l.label}</Txt>
            </Link>
          ))}
        </Card>
      </View>
      <CautionBlock />
    </Screen>
  );
}

const styles = StyleSheet.create({
  grid: { gap: 16 },
  gridWide: { flexDirection: 'row', alignItems: 'flex-start' },
  colWide: { flex: 2 },
  colNarrow: { flex: 1 },
  dot: { width: 6, height: 6, borderRadius: 3, backgroundColor: theme.color.hole, marginTop: 8 },
});
