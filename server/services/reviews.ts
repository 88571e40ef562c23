/**
 * Review and release of a batch: judging it against a spec version, the pass/fail export, the
 * review record, submitting it to the QA leads and their decision, with the mails both send.
 */
import { and, desc, eq } from 'drizzle-orm';
import type { Db } from '@/db/client';
import { batch, batchRelease, batchReview, member, user } from '@/db/schema';
import { describeSentence, evaluateBatch, passFailCsv } from '@/lib/quality';
import { failureSummary } from '@/lib/quality/reason-text';
import { formatDateTime } from '@/lib/format';
import type { BatchEvaluation } from '@/lib/quality';
import type { decisionSchema } from '@/lib/schemas/quality';
import { cautionText } from '@/lib/strings/cautions';
import { HttpError } from '@/server/errors';
import type { Mailer, OutgoingMail } from '@/server/mail';
import type { Caller } from '@/server/permissions';
import { touchBatch } from '@/server/services/answer-cache';
import { lockBatch } from '@/server/services/batch-lock';
import { batchJson, loadBatch } from '@/server/services/batches';
import type { BatchRow } from '@/server/services/batches';
import { deviceRecords } from '@/server/services/quality';
import { currentRevision, frozenDevices, latestRelease, releaseCheck, releaseIdsByReview, releasesOf, sha256 } from '@/server/services/releases';
import { batchSetupRef, judgedDevices } from '@/server/services/setups';
import { loadSpec } from '@/server/services/specs';
import { uncertaintyByKey } from '@/lib/quality/uncertainty';
import { DECISION_RULE_WORDS, type DecisionRule } from '@/lib/quality/decision-rules';
import type { ReviewListOut } from '@/lib/schemas/responses';

/** The parameters whose outliers an evaluation marks. */
const OUTLIER_PARAMS = ['pmp_w', 'voc_v', 'isc_a', 'ff', 'rs_ohm'] as const;
/** The columns of the pass/fail export, in order. */
const EXPORT_PARAMS = ['isc_a', 'voc_v', 'pmp_w', 'imp_a', 'vmp_v', 'ff', 'efficiency', 'stc_pmp_w', 'n', 'rs_ohm', 'rsh_ohm', 'j0_a_cm2'] as const;

/** Judges a batch against a spec version: per device pass/fail with reasons, classes, outliers, stats. */
async function evaluate(db: Db, b: BatchRow, organizationId: string, specId: string) {
  const { row, spec } = await loadSpec(db, organizationId, specId);
  // Each figure with the batch setup's expanded uncertainty and the batch's nameplate (server/services/setups.ts).
  const devices = await judgedDevices(db, b, await deviceRecords(db, [b.id]));
  const evaluation = evaluateBatch(devices, spec, { outlier_params: [...OUTLIER_PARAMS] });
  return { specRow: row, spec, evaluation, devices };
}

function counts(e: BatchEvaluation) {
  return { total: e.counts.total, pass: e.counts.pass, fail: e.counts.fail, outliers: e.counts.outliers };
}

/** The spec asked for, else the one of the batch's last review decision; 400 when there is neither. */
async function specFor(db: Db, batchId: string, asked: string | undefined): Promise<string> {
  if (asked) return asked;
  const rows = await db.select({ specId: batchReview.specId }).from(batchReview).where(eq(batchReview.batchId, batchId)).orderBy(desc(batchReview.createdAt));
  const last = rows.find((x) => x.specId)?.specId;
  if (!last) throw new HttpError(400, 'spec_required', 'Choose the spec to judge the batch against (?spec=<id>).');
  return last;
}

/** Every device of the batch judged against the spec version (default: the last decision's). */
export async function batchEvaluation(db: Db, organizationId: string, batchId: string, specId?: string) {
  const b = await loadBatch(db, organizationId, batchId);
  const { specRow, evaluation, devices } = await evaluate(db, b, organizationId, await specFor(db, b.id, specId));
  return {
    batch: batchJson(b),
    spec: { id: specRow.id, name: specRow.name, version: specRow.version, family_id: specRow.family_id },
    counts: counts(evaluation),
    power_class_counts: evaluation.power_class_counts,
    stats: evaluation.stats,
    devices: evaluation.devices.map((d, k) => ({ ...d, uncertainty: uncertaintyByKey(d.uncertainty), curve_id: devices[k].curve_id })),
    decision_rule: evaluation.decision_rule,
    inside_guard_band: evaluation.inside_guard_band,
    setup: await batchSetupRef(db, b),
  };
}

/**
 * The pass/fail CSV text of an evaluation and its file name: one row per device, with the batch,
 * the spec and its version, the release state and the export time on each (lib/quality/csv.ts).
 */
function passFailFile(b: Pick<BatchRow, 'name'>, specRow: { name: string; version: number }, evaluation: BatchEvaluation, releaseState: string, exportedAt: Date) {
  const text = passFailCsv(evaluation, { batchName: b.name, spec: { name: specRow.name, version: specRow.version }, releaseState, exportedAt, params: [...EXPORT_PARAMS] });
  const safeName = b.name.replace(/[^A-Za-z0-9._-]+/g, '_').slice(0, 60) || 'batch';
  return { fileName: `${safeName}-pass-fail-v${specRow.version}.csv`, text };
}

/**
 * The pass/fail CSV (formula-safe, lib/quality/csv.ts) and its file name. A released batch's CSV
 * (without ?spec or with the release's spec) is the one its release record keeps, byte for byte —
 * releases made before the exports changed keep the format they shipped in; otherwise it is
 * computed now. The high-voltage caution is not in the file: the screens and mails carry it.
 */
export async function passFailExport(db: Db, organizationId: string, batchId: string, specId?: string): Promise<{ fileName: string; text: string }> {
  const b = await loadBatch(db, organizationId, batchId);
  if (b.state === 'released') {
    const release = await latestRelease(db, b.id);
    if (release && (!specId || specId === release.specId)) return { fileName: release.csvFileName, text: release.csv };
  }
  const { specRow, evaluation } = await evaluate(db, b, organizationId, await specFor(db, b.id, specId));
  return passFailFile(b, specRow, evaluation, b.state, new Date());
}

/**
 * The review record: who did what, when, against which spec, with which counts, newest first;
 * every release with its frozen CSV's address; and whether the caller may release the batch
 * (separation of duties), so the screen can say why not instead of offering the button.
 */
export async function reviewHistory(db: Db, by: Caller, batchId: string) {
  const b = await loadBatch(db, by.organization.id, batchId);
  const rows = await db
    .select({ id: batchReview.id, action: batchReview.action, spec_id: batchReview.specId, counts: batchReview.counts, comment: batchReview.comment, created_at: batchReview.createdAt, actor: user.name, actor_email: user.email })
    .from(batchReview)
    .leftJoin(user, eq(user.id, batchReview.actorId))
    .where(eq(batchReview.batchId, b.id))
    .orderBy(desc(batchReview.createdAt));
  const releaseIds = await releaseIdsByReview(db, rows.map((r) => r.id));
  return {
    reviews: rows.map((r) => ({ ...r, release_id: releaseIds.get(r.id) ?? null })),
    releases: await releasesOf(db, b.id),
    release_check: await releaseCheck(db, by.organization.id, b.id, by.user.id),
  } satisfies ReviewListOut;
}

/** The batch's page in the app, for mails ("every mail links to its batch"). */
export const batchLink = (baseUrl: string, batchId: string) => `${baseUrl.replace(/\/$/, '')}/batches/${batchId}`;

/** The mail to a QA lead when a batch is submitted for review, with the high-voltage caution. */
export function reviewRequestMail(to: { email: string; name: string }, b: Pick<BatchRow, 'name'>, by: Caller, devices: number, comment: string | undefined, link = ''): OutgoingMail {
  return {
    to: to.email,
    kind: 'review-request',
    organizationId: by.organization.id,
    subject: `Quasilevel: batch “${b.name}” is ready for review`,
    text: [
      `Hello ${to.name},`,
      '',
      `${by.user.name} submitted the batch “${b.name}” (${devices} devices) for release review.`,
      comment ? `Their note: ${comment}` : '',
      '',
      'Open the batch in Quasilevel, judge it against an acceptance spec and release it or put it on hold.',
      link ? `The batch: ${link}` : '',
      '',
      cautionText(),
    ].join('\n'),
  };
}

/** The mail to the submitter when a QA lead releases or holds the batch (where its pass/fail list is, the high-voltage caution). */
export function decisionMail(
  to: { email: string; name: string },
  b: Pick<BatchRow, 'name'>,
  by: Caller,
  state: 'released' | 'on_hold',
  spec: { name: string; version: number },
  tally: ReturnType<typeof counts>,
  comment: string,
  rule: DecisionRule = 'simple',
  link = '',
  report?: { fileName: string; bytes: Buffer },
  /** Lines in the key table's words: the failing reasons by topic, the limited parameters' statistics. */
  details: string[] = [],
): OutgoingMail {
  const done = state === 'released' ? 'released' : 'put on hold';
  return {
    to: to.email,
    kind: 'release-decision',
    organizationId: by.organization.id,
    subject: `Quasilevel: batch “${b.name}” was ${done}`,
    text: [
      `Hello ${to.name},`,
      '',
      `${by.user.name} ${done} the batch “${b.name}”.`,
      `Judged against ${spec.name} v${spec.version}: ${tally.pass} pass, ${tally.fail} fail, ${tally.outliers} outliers of ${tally.total}.`,
      `Decision rule: ${DECISION_RULE_WORDS[rule]}.`,
      comment ? `Comment: ${comment}` : '',
      state === 'released' ? 'The pass/fail list (CSV) of this release is on the batch page under “Acceptance and release”.' : '',
      report ? `The release report (PDF) is attached: ${report.fileName}.` : '',
      link ? `The batch: ${link}` : '',
      ...details,
      `Decided ${formatDateTime(new Date(), { utc: true })}.`,
      '',
      cautionText(),
    ].join('\n'),
    ...(report ? { attachments: [{ filename: report.fileName, content: report.bytes, contentType: 'application/pdf' }] } : {}),
  };
}

/** The decision mail's lines about the evaluation: failing reasons by topic, then the statistics of each limited parameter. */
export function decisionDetails(evaluation: BatchEvaluation, spec: { limits?: Record<string, unknown> }): string[] {
  const failing = failureSummary(evaluation.devices);
  const limited = Object.keys(spec.limits ?? {});
  const stats = limited.flatMap((k) => {
    const d = evaluation.stats[k as keyof typeof evaluation.stats];
    return d ? [describeSentence(k, d)] : [];
  });
  return [...(failing.length ? ['', 'Why devices fail:', ...failing.map((l) => `- ${l}`)] : []), ...(stats.length ? ['', ...stats] : [])];
}

/** A test engineer hands the batch to the QA leads (e-mailed); 409 unless every curve has a converged fit. */
export async function submitBatch(db: Db, mailer: Mailer, by: Caller, batchId: string, comment: string | undefined, baseUrl = '') {
  const b = await loadBatch(db, by.organization.id, batchId);
  if (b.archived) throw new HttpError(409, 'batch_archived', 'Restore the batch from the archive before submitting it.');
  if (b.state === 'released') throw new HttpError(409, 'batch_released', 'This batch is already released.');
  if (b.state === 'in_review') throw new HttpError(409, 'already_in_review', 'This batch is already waiting for review.');
  const devices = await deviceRecords(db, [b.id]);
  if (!devices.length) throw new HttpError(409, 'batch_empty', 'Upload curves before submitting the batch for review.');
  const unfitted = devices.filter((d) => !d.fitted);
  if (unfitted.length) {
    throw new HttpError(409, 'unfitted_curves', `${unfitted.length} curve(s) have no converged fit (${unfitted.slice(0, 5).map((d) => d.device_id).join(', ')}${unfitted.length > 5 ? ', …' : ''}). Refit or remove them first.`);
  }
  await db.transaction(async (tx) => {
    await touchBatch(tx, b.id, { state: 'in_review' });
    await tx.insert(batchReview).values({ id: crypto.randomUUID(), batchId: b.id, action: 'submitted', counts: { total: devices.length }, comment: comment || null, actorId: by.user.id });
  });
  const leads = await db
    .select({ email: user.email, name: user.name })
    .from(member)
    .innerJoin(user, eq(user.id, member.userId))
    .where(and(eq(member.organizationId, by.organization.id), eq(member.role, 'qa_lead')));
  for (const l of leads) await mailer.send(reviewRequestMail(l, b, by, devices.length, comment, batchLink(baseUrl, b.id)));
  const [after] = await db.select().from(batch).where(eq(batch.id, b.id));
  return { batch: batchJson(after), notified: leads.length };
}

/**
 * The QA lead's decision on a batch in review, recorded with the spec version and the pass/fail
 * counts; the submitter is e-mailed. A release needs a comment when any device fails (400),
 * is refused to whoever submitted the batch or uploaded its curves (403 `same_person`, while the
 * organisation separates duties), and freezes what was judged in a release record: each
 * device's figures, result and data hash, and the pass/fail CSV served from then on. The batch
 * is judged outside the transaction; inside it, under the batch's row lock, the decision goes
 * through only if nothing changed the batch since (its revision stamp is the same).
 */
export async function decideBatch(db: Db, mailer: Mailer, by: Caller, batchId: string, body: ReturnType<typeof decisionSchema.parse>, baseUrl = '') {
  const b = await loadBatch(db, by.organization.id, batchId);
  if (b.state !== 'in_review') {
    throw new HttpError(409, 'not_in_review', b.state === 'released' ? 'This batch is already released.' : 'Only a batch submitted for review can be released or held.');
  }
  const releasing = body.decision === 'release';
  if (releasing) {
    const check = await releaseCheck(db, by.organization.id, b.id, by.user.id);
    if (!check.allowed) throw new HttpError(403, check.code, check.message);
  }
  const { specRow, spec, evaluation, devices } = await evaluate(db, b, by.organization.id, body.spec_id);
  const unfitted = devices.filter((d) => !d.fitted);
  if (releasing && unfitted.length) {
    throw new HttpError(409, 'unfitted_curves', `${unfitted.length} curve(s) have no converged fit; the batch cannot be released.`);
  }
  const tally = counts(evaluation);
  if (releasing && tally.fail > 0 && !body.comment) {
    throw new HttpError(400, 'comment_required', `comment: ${tally.fail} of ${tally.total} devices fail; write a comment saying why the batch is released anyway.`, { field: 'comment' });
  }
  const state = releasing ? 'released' : 'on_hold';
  const frozen = releasing ? await frozenDevices(db, b.id, evaluation, devices.map((d) => d.curve_id)) : [];
  // The release's moment: the export time in its CSV and the record's created_at are one instant.
  const releasedAt = new Date();
  const csv = releasing ? passFailFile(b, specRow, evaluation, 'released', releasedAt) : null;
  const reviewId = crypto.randomUUID();
  await db.transaction(async (tx) => {
    const now = await lockBatch(tx, b.id);
    if (now.state !== 'in_review') throw new HttpError(409, 'not_in_review', now.state === 'released' ? 'This batch is already released.' : 'This batch is no longer in review.');
    if (releasing && now.updatedAt.getTime() !== b.updatedAt.getTime()) {
      throw new HttpError(409, 'batch_changed', 'The batch changed while it was being judged. Look at it again, then decide.');
    }
    // The batch was unchanged since it was judged, so the same person check above still holds.
    await touchBatch(tx, b.id, { state });
    await tx.insert(batchReview).values({ id: reviewId, batchId: b.id, action: releasing ? 'released' : 'held', specId: specRow.id, counts: tally, comment: body.comment || null, actorId: by.user.id });
    if (csv) {
      await tx.insert(batchRelease).values({
        id: crypto.randomUUID(),
        organizationId: by.organization.id,
        batchId: b.id,
        revision: await currentRevision(tx, b.id),
        reviewId,
        specId: specRow.id,
        specName: specRow.name,
        specVersion: specRow.version,
        counts: tally,
        devices: frozen,
        csvFileName: csv.fileName,
        csv: csv.text,
        csvSha256: sha256(csv.text),
        comment: body.comment || null,
        releasedBy: by.user.id,
        createdAt: releasedAt,
      });
    }
  });
  const [submission] = await db
    .select({ email: user.email, name: user.name })
    .from(batchReview)
    .innerJoin(user, eq(user.id, batchReview.actorId))
    .where(and(eq(batchReview.batchId, b.id), eq(batchReview.action, 'submitted')))
    .orderBy(desc(batchReview.createdAt))
    .limit(1);
  if (submission) {
    // A release's mail carries its report, drawn from the release record just written.
    const report = releasing ? await (await import('@/server/services/report')).batchReportPdf(db, by.organization.id, b.id) : undefined;
    await mailer.send(decisionMail(submission, b, by, state, specRow, tally, body.comment, evaluation.decision_rule, batchLink(baseUrl, b.id), report, decisionDetails(evaluation, spec)));
  }
  const [after] = await db.select().from(batch).where(eq(batch.id, b.id));
  return { batch: batchJson(after), counts: tally, spec: { id: specRow.id, version: specRow.version, name: specRow.name } };
}
