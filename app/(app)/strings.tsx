import { ActivityIndicator, StyleSheet, View, useWindowDimensions } from 'react-native';
import { CautionBlock } from '@/components/caution-block';
import { Screen } from '@/components/screen';
import { StringForm } from '@/components/string-form';
import { StringResult } from '@/components/string-result';
import { theme } from '@/components/theme';
import { Txt } from '@/components/txt';
import { useSizeString } from '@/lib/api/strings';

/** /strings — how many modules fit in series, from a measured batch or typed values. */
export default function StringsScreen() {
  const size = useSizeString();
  const { width } = useWindowDimensions();
  const wide = width >= theme.wideFrom;
  return (
    <Screen
      title="String sizing"
      subtitle="How many modules in series before the coldest morning’s open-circuit voltage reaches the system limit, and how few still reach the inverter’s MPP window when hot. Design guidance."
      testID="strings-screen"
    >
      <View style={[{ gap: 16 }, wide && { flexDirection: 'row', alignItems: 'flex-start' }]}>
        <View style={wide ? styles.formCol : undefined}>
          <StringForm onSubmit={(v) => size.mutate(v)} busy={size.isPending} error={size.error} wide={wide} />
        </View>
        <View style={[{ gap: 16 }, wide && styles.resultCol]}>
          {size.isPending ? (
            <View style={[styles.box, { alignItems: 'center' }]} testID="state-loading">
              <ActivityIndicator color={theme.color.electron} />
              <Txt variant="caption">Sizing…</Txt>
            </View>
          ) : size.data && !size.isError ? (
            <StringResult key={JSON.stringify(size.data.inputs)} r={size.data} wide={wide} />
          ) : (
            <>
              <View style={[styles.box, size.isError ? styles.error : styles.empty]} testID={size.isError ? 'state-error' : 'state-empty'}>
                <Txt variant="body">
                  {size.isError
                    ? 'Nothing was sized: fix the input named in the message by the “Size the string” button and size again.'
                    : 'Nothing sized yet. Pick a batch or type the module’s values, enter the site’s record low and the system limit, then size the string.'}
                </Txt>
              </View>
              <CautionBlock expanded />
            </>
          )}
        </View>
      </View>
    </Screen>
  );
}

const styles = StyleSheet.create({
  formCol: { flex: 1, minWidth: 340, maxWidth: 520 },
  resultCol: { flex: 1.6, minWidth: 0 },
  box: { padding: 16, borderRadius: theme.radius.m, gap: 12, borderWidth: 1 },
  empty: { backgroundColor: theme.color.sunken, borderColor: theme.color.line },
  error: { backgroundColor: theme.color.dangerSoft, borderColor: theme.color.danger },
});
