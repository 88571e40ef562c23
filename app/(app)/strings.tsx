import { ActivityIndicator, StyleSheet, View, useWindowDimensions } from 'react-native';
import { CautionBlock } from '@/components/caution-block';
import { Screen } from '@/components/screen';
import { SizingError } from '@/components/string-error';
import { StringForm } from '@/components/string-form';
import { StringResult } from '@/components/string-result';
import { theme } from '@/components/theme';
import { Txt } from '@/components/txt';
import { toUserMessage } from '@/lib/api/client';
import { useSizeString } from '@/lib/api/strings';
import { sizingMessageForForm } from '@/lib/schemas/strings';

/** /strings — how many modules fit in series, from a measured batch or typed values. */
export default function StringsScreen() {
  const size = useSizeString();
  const { width } = useWindowDimensions();
  const wide = width >= theme.wideFrom;
  const error = size.isError ? sizingMessageForForm(toUserMessage(size.error)) : null;
  const r = size.isSuccess ? size.data : undefined;
  const summary = r && !wide ? `At most ${r.max_modules} modules${r.min_modules !== undefined ? `, at least ${r.min_modules}` : ''}: details below.` : null;
  return (
    <Screen
      title="String sizing"
      subtitle="How many modules in series before the coldest morning’s open-circuit voltage reaches the system limit, and how few still reach the inverter’s MPP window when hot. Design guidance."
      testID="strings-screen"
    >
      <View style={[{ gap: 16 }, wide && { flexDirection: 'row', alignItems: 'flex-start' }]}>
        <View style={wide ? styles.formCol : undefined}>
          <StringForm onSubmit={(v) => size.mutate(v)} busy={size.isPending} error={wide ? null : error} summary={summary} wide={wide} />
        </View>
        <View style={[{ gap: 16 }, wide && styles.resultCol]}>
          {size.isPending ? (
            <View style={[styles.box, styles.empty, { alignItems: 'center' }]} testID="strings-loading">
              <ActivityIndicator color={theme.color.electron} />
              <Txt variant="caption">Sizing…</Txt>
            </View>
          ) : r ? (
            <StringResult key={JSON.stringify(r.inputs)} r={r} wide={wide} />
          ) : (
            <>
              {error && wide ? (
                <SizingError message={error} />
              ) : (
                <View style={[styles.box, styles.empty]} testID="strings-empty">
                  <Txt variant="body">
                    {error
                      ? 'Nothing was sized: correct the input the message above names, then size again.'
                      : 'Nothing sized yet. Pick a batch or type the module’s values, enter the site’s record low and the system limit, then size the string.'}
                  </Txt>
                </View>
              )}
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
});
