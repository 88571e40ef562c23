import { useState } from 'react';
import { Modal, ScrollView, StyleSheet, TextInput, View } from 'react-native';
import { Button } from '@/components/button';
import { CautionBlock } from '@/components/caution-block';
import { Figure } from '@/components/figure';
import { FormError } from '@/components/form-error';
import { theme } from '@/components/theme';
import { Txt } from '@/components/txt';
import type { Evaluation } from '@/lib/api/quality';

/** Failing devices listed in the dialog; the rest are counted (the CSV has them all). */
const SHOWN = 30;

/**
 * The confirmation before a release: what is about to be shipped (counts, the spec version, every
 * failing device with its reasons) and, when any device fails, a comment that must be written —
 * the server refuses such a release without one. A release cannot be undone, only reopened.
 */
export function ReleaseDialog({ evaluation, busy, error, onConfirm, onClose }: { evaluation: Evaluation; busy: boolean; error: unknown; onConfirm: (comment: string) => void; onClose: () => void }) {
  const [comment, setComment] = useState('');
  const failing = evaluation.devices.filter((d) => d.result === 'fail');
  const needsComment = failing.length > 0;
  const ready = !needsComment || comment.trim().length > 0;
  const c = evaluation.counts;
  return (
    // react-native-web hands unknown props to the element with role="dialog": its accessible name.
    // No fade: react-native-web gives the element role="dialog" and traps focus only once the
    // opening animation has ended, so during a fade a screen reader meets an unnamed box.
    <Modal transparent visible animationType="none" onRequestClose={onClose} {...({ 'aria-label': `Release “${evaluation.batch.name}”?` } as object)}>
      <View style={styles.backdrop}>
        <View style={styles.sheet} testID="release-dialog">
          <ScrollView contentContainerStyle={{ gap: 14, padding: 20 }}>
            <Txt variant="title">Release “{evaluation.batch.name}”?</Txt>
            <Txt variant="body" testID="release-dialog-spec">
              Judged against {evaluation.spec.name} version {evaluation.spec.version}. The pass/fail list is frozen as it is now and the batch becomes read-only; only a QA lead can reopen it, with a written reason.
            </Txt>
            <View style={styles.figures} testID="release-dialog-counts">
              <Figure label="Devices" value={String(c.total)} />
              <Figure label="Pass" value={String(c.pass)} />
              <Figure label="Fail" value={String(c.fail)} warn={c.fail > 0} />
              <Figure label="Outliers" value={String(c.outliers)} note="marked, not failed" />
            </View>
            {needsComment ? (
              <View style={{ gap: 6 }} testID="release-dialog-failing">
                <Txt variant="label">Failing devices</Txt>
                {failing.slice(0, SHOWN).map((d) => (
                  <View key={d.curve_id} style={styles.failRow}>
                    <Txt variant="figure" style={{ fontSize: 13 }}>{d.device_id}</Txt>
                    <Txt variant="caption" style={{ flex: 1, minWidth: 180 }}>{d.reasons.map((r) => r.message).join('; ')}</Txt>
                  </View>
                ))}
                {failing.length > SHOWN ? <Txt variant="caption">…and {failing.length - SHOWN} more in the pass/fail list.</Txt> : null}
              </View>
            ) : (
              <Txt variant="body">Every device passes.</Txt>
            )}
            <View style={{ gap: 4 }}>
              <Txt variant="label">{needsComment ? `Comment (required: ${failing.length} ${failing.length === 1 ? 'device fails' : 'devices fail'})` : 'Comment (optional)'}</Txt>
              <TextInput
                value={comment}
                onChangeText={setComment}
                placeholder={needsComment ? 'Why is the batch released with failing devices?' : 'A note for the record'}
                placeholderTextColor={theme.color.muted}
                style={styles.input}
                multiline
                accessibilityLabel="Release comment"
                testID="release-comment"
              />
              {needsComment && !ready ? (
                <Txt variant="caption" style={{ color: theme.color.danger }} testID="release-comment-needed">
                  Write why the batch is released although devices fail.
                </Txt>
              ) : null}
            </View>
            {/* What is released is read and acted on: the high-voltage caution goes with it (the CSV holds data rows only). */}
            <CautionBlock />
            <FormError error={error} />
            <View style={styles.actions}>
              <Button label="Release batch" onPress={() => onConfirm(comment.trim())} busy={busy} disabled={!ready} testID="release-confirm" />
              <Button label="Cancel" kind="quiet" onPress={onClose} testID="release-cancel" />
            </View>
          </ScrollView>
        </View>
      </View>
    </Modal>
  );
}

const styles = StyleSheet.create({
  backdrop: { flex: 1, backgroundColor: 'rgba(17,26,46,0.45)', alignItems: 'center', justifyContent: 'center', padding: 12 },
  sheet: { backgroundColor: theme.color.surface, borderRadius: theme.radius.l, width: '100%', maxWidth: 640, maxHeight: '92%' },
  figures: { flexDirection: 'row', flexWrap: 'wrap', gap: 14 },
  failRow: { flexDirection: 'row', gap: 10, flexWrap: 'wrap', alignItems: 'baseline' },
  input: { minHeight: 70, borderWidth: 1, borderColor: theme.color.line, borderRadius: theme.radius.m, padding: 10, fontFamily: theme.font.regular, fontSize: 14, color: theme.color.ink, backgroundColor: theme.color.surface },
  actions: { flexDirection: 'row', gap: 8, flexWrap: 'wrap' },
});
