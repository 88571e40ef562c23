import { useCallback, useMemo } from 'react';
import { ActivityIndicator, StyleSheet, View, useWindowDimensions } from 'react-native';
import { CautionBlock } from '@/components/caution-block';
import { Screen } from '@/components/screen';
import { StringForm } from '@/components/string-form';
import { StringResult } from '@/components/string-result';
import { theme } from '@/components/theme';
import { Txt } from '@/components/txt';
import { toUserMessage } from '@/lib/api/client';
import { useSizeString } from '@/lib/api/strings';

/** /strings — how many modules fit in series, from a measured batch or typed values. */
export default function StringsScreen() {
  const size = useSizeString();
  const { width } = useWindowDimensions();
  const wide = width >= theme.wideFrom;
  // The API's words; the form puts the message at the field it names, in the form's labels.
  const failedMessage = size.isError ? toUserMessage(size.error) : null;
  const serverError = useMemo(() => (failedMessage ? { message: failedMessage, at: size.submittedAt } : null), [failedMessage, size.submittedAt]);
  const r = size.isSuccess ? size.data : undefined;
  const summary = r && !wide ? `At most ${r.max_modules} modules${r.min_modules !== undefined ? `, at least ${r.min_modules}` : ''}: details below.` : null;
  // An invalid input drops the previous result (and a previous request's error): no stale answer.
  const { reset } = size;
  const dropResult = useCallback(() => {
    if (size.isSuccess || size.isError) reset();
  }, [size.isSuccess, size.isError, reset]);
  return (
    <Screen
      title="String sizing"
      subtitle="How many modules in series before the coldest morning’s open-circuit voltage reaches the system limit, and how few still reach the inverter’s MPP window when hot. Design guidance."
      testID="strings-screen"
    >
      <View style={[{ gap: 16 }, wide && { flexDirection: 'row', alignItems: 'flex-start' }]}>
        <View style={wide ? styles.formCol : undefined}>
          <StringForm onSubmit={(v) => size.mutate(v)} onInvalid={dropResult} busy={size.isPending} serverError={serverError} summary={summary} wide={wide} />
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
              <View style={[styles.box, styles.empty]} testID="strings-empty">
                <Txt variant="body">
                  {serverError
                    ? 'Nothing was sized: correct the input the message names, then size again.'
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
});
