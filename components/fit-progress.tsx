/**
 * Fits still on their way (PostgreSQL mode queues them): "Fitting: 120 of 1,000 curves done",
 * a bar, and a way to cancel the fits not yet started. Shows nothing once every fit is done, so
 * the embedded mode (fits done when the upload answers) never sees it.
 */
import { StyleSheet, View } from 'react-native';
import { Button } from '@/components/button';
import { theme } from '@/components/theme';
import { Txt } from '@/components/txt';
import type { FitStatus } from '@/lib/schemas/responses';

export function FitProgress({ status, canCancel, cancelling, onCancel }: { status: FitStatus; canCancel: boolean; cancelling: boolean; onCancel: () => void }) {
  const { queued, fitting, done, failed } = status.counts;
  const total = queued + fitting + done + failed;
  if (queued + fitting === 0 && failed === 0) return null;
  const share = total ? (done + failed) / total : 1;
  const n = (x: number) => x.toLocaleString('en-GB');
  return (
    <View style={styles.box} testID="fit-progress" accessibilityRole="progressbar" accessibilityValue={{ min: 0, max: total, now: done + failed }}>
      <Txt variant="label">
        {queued + fitting > 0 ? `Fitting: ${n(done)} of ${n(total)} curves done` : `Fits finished: ${n(done)} of ${n(total)} curves`}
        {failed ? ` · ${n(failed)} not fitted (cancelled or failed; see each curve)` : ''}
      </Txt>
      <View style={styles.track}>
        <View style={[styles.bar, { width: `${Math.round(share * 100)}%` }]} />
      </View>
      {queued > 0 ? (
        <View style={styles.row}>
          <Txt variant="caption">{n(queued)} waiting to start{fitting ? `, ${n(fitting)} being fitted` : ''}.</Txt>
          {canCancel ? <Button label={`Cancel ${n(queued)} not started`} kind="secondary" busy={cancelling} onPress={onCancel} testID="fit-cancel" /> : null}
        </View>
      ) : null}
    </View>
  );
}

const styles = StyleSheet.create({
  box: { gap: 8, backgroundColor: theme.color.surface, borderRadius: theme.radius.l, borderWidth: 1, borderColor: theme.color.line, padding: 16 },
  track: { height: 8, borderRadius: 4, backgroundColor: theme.color.sunken, overflow: 'hidden' },
  bar: { height: 8, backgroundColor: theme.color.electron },
  row: { flexDirection: 'row', alignItems: 'center', justifyContent: 'space-between', gap: 12, flexWrap: 'wrap' },
});
