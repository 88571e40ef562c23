import { Link } from 'expo-router';
import { useState } from 'react';
import { Pressable, StyleSheet, TextInput, View } from 'react-native';
import { Button } from '@/components/button';
import { Card } from '@/components/card';
import { CautionBlock } from '@/components/caution-block';
import { DecisionRuleNote } from '@/components/decision-rule-note';
import { Figure } from '@/components/figure';
import { FormError } from '@/components/form-error';
import { NameplateBinsNote } from '@/components/nameplate-bins-note';
import { QueryState } from '@/components/query-state';
import { ReleaseDialog } from '@/components/release-dialog';
import { theme } from '@/components/theme';
import { Txt } from '@/components/txt';
import type { Batch } from '@/lib/api/batches';
import { passFailUrl, reportUrl, useDecision, useEvaluation, useReopen, useReviews, useSpecs, useSubmitBatch } from '@/lib/api/quality';
import type { Me } from '@/lib/api/session';
import type { Permission } from '@/lib/auth/roles';
import { downloadFromUrl } from '@/lib/download';
import { formatDateTime } from '@/lib/format';
import { labelOf } from '@/lib/vocabulary';

const ACTION_WORDS: Record<string, string> = { submitted: 'submitted for review', released: 'released', held: 'put on hold', reopened: 'reopened' };

/**
 * Judging and releasing a batch: pick a spec version, see pass/fail with every reason, the power
 * classes and outliers, download the pass/fail list, submit (test engineer) or decide (QA lead).
 * Release goes through a confirmation (ReleaseDialog); someone who submitted the batch or uploaded
 * its curves is told why they cannot release it; a released batch can be reopened with a reason,
 * and each release's pass/fail list stays downloadable from the record.
 */
export function ReviewPanel({ b, me }: { b: Batch; me: Me }) {
  const specs = useSpecs();
  const reviews = useReviews(b.id);
  const lastSpec = reviews.data?.reviews.find((r) => r.spec_id)?.spec_id ?? '';
  const [chosen, setChosen] = useState('');
  const specId = chosen || lastSpec || specs.data?.specs[0]?.id || '';
  const evaluation = useEvaluation(b.id, specId);
  const submit = useSubmitBatch(b.id);
  const decide = useDecision(b.id);
  const reopen = useReopen(b.id);
  const [comment, setComment] = useState('');
  const [confirming, setConfirming] = useState(false);
  const [reopening, setReopening] = useState(false);
  const [reason, setReason] = useState('');
  const check = reviews.data?.release_check;
  const can = (p: Permission) => me.permissions.includes(p);
  const canSubmit = can('batch:submit') && (b.state === 'open' || b.state === 'on_hold') && !b.archived;
  const canDecide = can('release:decide') && b.state === 'in_review';
  const canReopen = can('release:decide') && b.state === 'released';
  const releaseCsv = new Map((reviews.data?.releases ?? []).map((r) => [r.id, r]));

  return (
    <Card title="Acceptance and release" testID="review-panel">
      <QueryState query={specs} isEmpty={(d) => d.specs.length === 0} empty={can('spec:write') ? 'No acceptance spec yet: create one under Acceptance specs.' : 'No acceptance spec yet: a QA lead creates them.'}>
        {(d) => (
          <View style={{ gap: 12 }}>
            <View style={{ gap: 4 }}>
              <Txt variant="label">Judge against</Txt>
              <View style={styles.chips} accessibilityRole="radiogroup" accessibilityLabel="Spec">
                {d.specs.map((s) => (
                  <Pressable key={s.id} onPress={() => setChosen(s.id)} accessibilityRole="radio" aria-checked={s.id === specId} style={[styles.chip, s.id === specId && styles.chipOn]} testID={`spec-choice-${s.name}`}>
                    <Txt variant="caption" style={{ color: s.id === specId ? '#fff' : theme.color.inkSoft }}>{s.name} v{s.version}</Txt>
                  </Pressable>
                ))}
                {lastSpec && !d.specs.some((s) => s.id === lastSpec) ? (
                  <Pressable onPress={() => setChosen(lastSpec)} style={[styles.chip, lastSpec === specId && styles.chipOn]}>
                    <Txt variant="caption" style={{ color: lastSpec === specId ? '#fff' : theme.color.inkSoft }}>version of the last decision</Txt>
                  </Pressable>
                ) : null}
              </View>
            </View>
            <QueryState query={evaluation}>
              {(e) => {
                const failing = e.devices.filter((x) => x.result === 'fail');
                const outliers = e.devices.filter((x) => x.outlier);
                return (
                  <View style={{ gap: 12 }} testID="evaluation">
                    <View style={styles.figures}>
                      <Figure label="Pass" value={String(e.counts.pass)} note={`of ${e.counts.total}`} testID="count-pass" />
                      <Figure label="Fail" value={String(e.counts.fail)} warn={e.counts.fail > 0} testID="count-fail" />
                      <Figure label="Outliers (|z| > 3.5)" value={String(e.counts.outliers)} note="robust z on MAD, marked not failed" />
                      <Figure label="Inside the guard band" value={String(e.inside_guard_band)} note="a value within its uncertainty of a limit" testID="count-guard-band" />
                    </View>
                    <DecisionRuleNote evaluation={e} />
                    <View style={{ gap: 4 }} testID="power-classes">
                      <Txt variant="label">Power classes</Txt>
                      <View style={styles.chips}>
                        {Object.keys(e.power_class_counts).length ? (
                          Object.entries(e.power_class_counts)
                            .sort()
                            .map(([k, n]) => (
                              <View key={k} style={styles.classChip}>
                                <Txt variant="figure" style={{ fontSize: 13 }}>{k}</Txt>
                                <Txt variant="caption">× {n}</Txt>
                              </View>
                            ))
                        ) : (
                          <Txt variant="caption">{d.specs.find((s) => s.id === specId)?.power_classes ? 'No device has a power class.' : 'This spec sets no power classes.'}</Txt>
                        )}
                      </View>
                      <NameplateBinsNote spec={d.specs.find((s) => s.id === specId)} nameplate_w={b.nameplate_w} />
                    </View>
                    {failing.length ? (
                      <View style={{ gap: 6 }}>
                        <Txt variant="label">Failing devices</Txt>
                        {failing.slice(0, 25).map((x) => (
                          <View key={x.curve_id} style={styles.failRow}>
                            <Link href={`/curves/${x.curve_id}`}>
                              <Txt variant="figure" style={{ color: theme.color.electron, fontSize: 13 }}>{x.device_id}</Txt>
                            </Link>
                            <Txt variant="caption" style={{ flex: 1, minWidth: 200 }}>{x.reasons.map((r) => r.message).join('; ')}</Txt>
                          </View>
                        ))}
                        {failing.length > 25 ? <Txt variant="caption">…and {failing.length - 25} more in the pass/fail list.</Txt> : null}
                      </View>
                    ) : null}
                    {outliers.length ? <Txt variant="caption">Outliers: {outliers.map((x) => `${x.device_id} (${x.outlier_params.map(labelOf).join(', ')})`).join('; ')}</Txt> : null}
                    {/* The pass/fail list is downloaded here: its high-voltage caution is shown beside it, not written into the file. */}
                    <CautionBlock />
                    <View style={{ flexDirection: 'row', flexWrap: 'wrap', gap: 8 }}>
                      <Button label="Download pass/fail list (CSV)" kind="secondary" onPress={() => downloadFromUrl(passFailUrl(b.id, e.spec.id))} testID="download-pass-fail" />
                      <Button label="Download report (PDF)" kind="secondary" onPress={() => downloadFromUrl(reportUrl(b.id, e.spec.id))} testID="download-report" />
                    </View>
                  </View>
                );
              }}
            </QueryState>
          </View>
        )}
      </QueryState>
      {canSubmit || canDecide ? (
        <View style={{ gap: 8 }}>
          <TextInput
            value={comment}
            onChangeText={setComment}
            placeholder={canDecide ? 'Comment (needed to hold; the release asks for its own)' : 'Note for the QA lead (optional)'}
            placeholderTextColor={theme.color.muted}
            style={styles.input}
            multiline
            accessibilityLabel="Comment"
            testID="review-comment"
          />
          <FormError error={submit.error ?? decide.error} />
          <View style={{ flexDirection: 'row', gap: 8, flexWrap: 'wrap' }}>
            {canSubmit ? <Button label="Submit for review" onPress={() => submit.mutate(comment, { onSuccess: () => setComment('') })} busy={submit.isPending} testID="submit-review" /> : null}
            {canDecide ? (
              <>
                {check && !check.allowed ? null : <Button label="Release…" onPress={() => { decide.reset(); setConfirming(true); }} disabled={!specId || !evaluation.data || !check} testID="release" />}
                <Button label="Hold" kind="danger" onPress={() => decide.mutate({ decision: 'hold', spec_id: specId, comment }, { onSuccess: () => setComment('') })} busy={decide.isPending} disabled={!specId} testID="hold" />
              </>
            ) : null}
          </View>
          {canDecide && check && !check.allowed ? (
            <Txt variant="caption" style={styles.notice} testID="same-person">
              {check.message} You can still put it on hold.
            </Txt>
          ) : null}
          {confirming && evaluation.data ? (
            <ReleaseDialog
              evaluation={evaluation.data}
              busy={decide.isPending}
              error={decide.error}
              onClose={() => setConfirming(false)}
              onConfirm={(text) => decide.mutate({ decision: 'release', spec_id: specId, comment: text }, { onSuccess: () => { setConfirming(false); setComment(''); } })}
            />
          ) : null}
        </View>
      ) : canReopen ? (
        <View style={{ gap: 8 }} testID="reopen">
          <Txt variant="caption">Released batches are read-only. Reopening makes a new revision: the batch goes on hold for changes and a new submission; this release stays in the record.</Txt>
          {reopening ? (
            <>
              <TextInput value={reason} onChangeText={setReason} placeholder="Why is the released batch reopened? (required)" placeholderTextColor={theme.color.muted} style={styles.input} multiline accessibilityLabel="Reason for reopening" testID="reopen-reason" />
              <FormError error={reopen.error} />
              <View style={{ flexDirection: 'row', gap: 8, flexWrap: 'wrap' }}>
                <Button label="Reopen batch" kind="danger" onPress={() => reopen.mutate(reason.trim(), { onSuccess: () => { setReopening(false); setReason(''); } })} busy={reopen.isPending} disabled={!reason.trim()} testID="reopen-confirm" />
                <Button label="Cancel" kind="quiet" onPress={() => setReopening(false)} />
              </View>
            </>
          ) : (
            <View style={{ flexDirection: 'row' }}>
              <Button label="Reopen…" kind="secondary" onPress={() => setReopening(true)} testID="reopen-start" />
            </View>
          )}
        </View>
      ) : b.state === 'in_review' ? (
        <Txt variant="caption">Waiting for a QA lead’s decision.</Txt>
      ) : b.state === 'released' ? (
        <Txt variant="caption">Released batches are read-only.</Txt>
      ) : null}
      <QueryState query={reviews} isEmpty={(d) => d.reviews.length === 0} empty="No review yet.">
        {(d) => (
          <View style={{ gap: 4 }} testID="review-record">
            <Txt variant="label">Record</Txt>
            {d.reviews.map((r) => (
              <Txt key={r.id} variant="caption">
                {formatDateTime(r.created_at)} · {r.actor ?? 'someone'} {ACTION_WORDS[r.action] ?? r.action}
                {r.counts && r.counts.pass != null ? ` · ${r.counts.pass} pass, ${r.counts.fail} fail, ${r.counts.outliers} outliers` : ''}
                {r.comment ? ` · “${r.comment}”` : ''}
                {r.release_id && releaseCsv.get(r.release_id) ? (
                  <Txt variant="caption" style={{ color: theme.color.electron }} onPress={() => downloadFromUrl(releaseCsv.get(r.release_id!)!.csv_url)} testID={`release-csv-${releaseCsv.get(r.release_id)!.revision}`}>
                    {` · pass/fail list of revision ${releaseCsv.get(r.release_id)!.revision} (CSV)`}
                  </Txt>
                ) : null}
              </Txt>
            ))}
          </View>
        )}
      </QueryState>
    </Card>
  );
}

const styles = StyleSheet.create({
  chips: { flexDirection: 'row', flexWrap: 'wrap', gap: 6 },
  chip: { paddingHorizontal: 10, paddingVertical: 5, borderRadius: 999, borderWidth: 1, borderColor: theme.color.line },
  chipOn: { backgroundColor: theme.color.ink, borderColor: theme.color.ink },
  figures: { flexDirection: 'row', flexWrap: 'wrap', gap: 14 },
  classChip: { flexDirection: 'row', gap: 4, alignItems: 'baseline', backgroundColor: theme.color.sunken, borderRadius: 6, paddingHorizontal: 8, paddingVertical: 2 },
  failRow: { flexDirection: 'row', gap: 10, flexWrap: 'wrap', alignItems: 'baseline' },
  notice: { backgroundColor: theme.color.holeSoft, borderRadius: theme.radius.m, padding: 10, color: theme.color.ink },
  input: { minHeight: 60, borderWidth: 1, borderColor: theme.color.line, borderRadius: theme.radius.m, padding: 10, fontFamily: theme.font.regular, fontSize: 14, color: theme.color.ink, backgroundColor: theme.color.surface },
});
