import { Slot } from 'expo-router';
import { ScrollView, StyleSheet, View, useWindowDimensions } from 'react-native';
import { LogoMark } from '@/components/logo-mark';
import { theme } from '@/components/theme';
import { Txt } from '@/components/txt';

/** Signed-out frame: the form in a card; on wide screens a panel saying what Quasilevel is. */
export default function AuthLayout() {
  const { width } = useWindowDimensions();
  const wide = width >= theme.wideFrom;
  return (
    <View style={[styles.page, wide && { flexDirection: 'row' }]}>
      {wide ? (
        <View style={styles.panel} role="banner">
          <LogoMark withName onDark size={36} />
          <Txt variant="title" style={{ color: '#fff', marginTop: 40, fontSize: 30, lineHeight: 38 }}>
            From the flash line to a release decision.
          </Txt>
          <Txt variant="body" style={{ color: theme.color.navText, marginTop: 12, maxWidth: 440 }}>
            Upload I-V curves, fit single- and double-diode models, tie the saturation current to the
            silicon, translate to STC, compare batches and release them against your acceptance limits.
          </Txt>
        </View>
      ) : null}
      <ScrollView style={{ flex: 1 }} contentContainerStyle={styles.formSide}>
        {!wide ? (
          <View style={{ marginBottom: 20 }} role="banner">
            <LogoMark withName size={30} />
          </View>
        ) : null}
        <View style={styles.card} role="main">
          <Slot />
        </View>
      </ScrollView>
    </View>
  );
}

const styles = StyleSheet.create({
  page: { flex: 1, backgroundColor: theme.color.paper },
  panel: { width: '42%', backgroundColor: theme.color.navBg, padding: 48, justifyContent: 'center' },
  formSide: { flexGrow: 1, justifyContent: 'center', alignItems: 'center', padding: 20 },
  card: {
    width: '100%',
    maxWidth: 420,
    backgroundColor: theme.color.surface,
    borderRadius: theme.radius.l,
    borderWidth: 1,
    borderColor: theme.color.line,
    padding: 22,
    gap: 14,
  },
});
