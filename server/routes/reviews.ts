import { and, desc, eq } from 'drizzle-orm';
import { Router } from 'express';
import Papa from 'papaparse';
import type { Db } from '@/db/client';
import { batch, batchReview, member, user } from '@/db/schema';
import { csvSafeCell, evaluateBatch, passFailRows } from '@/lib/quality';
import type { BatchEvaluation } from '@/lib/quality';
import { decisionSchema, submitSchema } from '@/lib/schemas/quality';
import { HV_CAUTION } from '@/lib/strings/cautions';
import { HttpError } from '@/server/errors';
import type { Mailer } from '@/server/mail';
import { callerOf, requirePermission } from '@/server/permissions';
import { batchJson, loadBatch } from '@/server/routes/batches';
import { touchBatch } from '@/server/services/answer-cache';
import { deviceRecords, loadSpec } from '@/server/services/quality';
import { validate } from '@/server/validate';

/** Judges a batch against a spec version: per device pass/fail with reasons, classes, outliers, stats. */
async function evaluate(db: Db, batchId: string, organizationId: string, specId: string) {
  const { row, spec } = await loadSpec(db, organizationId, specId);
  const devices = await deviceRecords(db, [batchId]);
  const evaluation = evaluateBatch(devices, spec, { outlierParams: ['pmp_w', 'voc_v', 'isc_a', 'ff', 'rs_ohm'] });
  return { specRow: row, evaluation, devices };
}

function counts(e: BatchEvaluation) {
  return { total: e.counts.total, pass: e.counts.pass, fail: e.counts.fail, outliers: e.counts.outliers };
}

/** The spec a batch was last judged against, for exports without ?spec. */
async function lastDecisionSpec(db: Db, batchId: string): Promise<string | null> {
  const rows = await db.select({ specId: batchReview.specId }).from(batchReview).where(eq(batchReview.batchId, batchId)).orderBy(desc(batchReview.createdAt));
  return rows.find((x) => x.specId)?.specId ?? null;
}

/** Review, release and export routes of a batch (mounted under /api/batches). */
export function reviewsRouter(db: Db, mailer: Mailer): Router {
  const r = Router();

  /** GET /api/batches/:id/evaluation?spec=<specId> — every device judged against that spec version. */
  r.get('/:id/evaluation', requirePermission('batch:read'), async (req, res) => {
    const c = callerOf(req);
    const b = await loadBatch(db, req);
    const specId = String(req.query.spec ?? '') || (await lastDecisionSpec(db, b.id));
    if (!specId) throw new HttpError(400, 'spec_required', 'Choose the spec to judge the batch against (?spec=<id>).');
    const { specRow, evaluation, devices } = await evaluate(db, b.id, c.organization.id, specId);
    res.json({
      batch: batchJson(b),
      spec: { id: specRow.id, name: specRow.name, version: specRow.version, familyId: specRow.familyId },
      counts: counts(evaluation),
      powerClassCounts: evaluation.powerClassCounts,
      stats: evaluation.stats,
      devices: evaluation.devices.map((d, k) => ({ ...d, curveId: devices[k].curveId })),
    });
  });

  /**
   * GET /api/batches/:id/pass-fail.csv?spec=<specId> — one row per device: device_id, result, reasons,
   * power_class, outlier, key figures, spec_version, release_state. Cells that a spreadsheet would run
   * as a formula are escaped. Without ?spec, the spec of the batch's last review decision is used.
   */
  r.get('/:id/pass-fail.csv', requirePermission('batch:read'), async (req, res) => {
    const c = callerOf(req);
    const b = await loadBatch(db, req);
    const specId = String(req.query.spec ?? '') || (await lastDecisionSpec(db, b.id));
    if (!specId) throw new HttpError(400, 'spec_required', 'Choose the spec to judge the batch against (?spec=<id>).');
    const { specRow, evaluation } = await evaluate(db, b.id, c.organization.id, specId);
    const rows = passFailRows(evaluation, {
      specVersion: `${specRow.name} v${specRow.version}`,
      releaseState: b.state,
      params: ['isc_a', 'voc_v', 'pmp_w', 'imp_a', 'vmp_v', 'ff', 'efficiency', 'stc_pmp_w', 'n', 'rs_ohm', 'rsh_ohm', 'j0_a_cm2'],
    });
    const csv = Papa.unparse({ fields: rows.fields, data: rows.data }, { newline: '\r\n' });
    const note = Papa.unparse([[csvSafeCell(`# ${HV_CAUTION.short}`)]]);
    const safeName = b.name.replace(/[^A-Za-z0-9._-]+/g, '_').slice(0, 60) || 'batch';
    res.setHeader('Content-Type', 'text/csv; charset=utf-8');
    res.setHeader('Content-Disposition', `attachment; filename="${safeName}-pass-fail-v${specRow.version}.csv"`);
    res.send(`${csv}\r\n${note}\r\n`);
  });

  /** GET /api/batches/:id/reviews — the review record: who did what, when, against which spec, with which counts. */
  r.get('/:id/reviews', requirePermission('batch:read'), async (req, res) => {
    const b = await loadBatch(db, req);
    const rows = await db
      .select({ id: batchReview.id, action: batchReview.action, specId: batchReview.specId, counts: batchReview.counts, comment: batchReview.comment, createdAt: batchReview.createdAt, actor: user.name, actorEmail: user.email })
      .from(batchReview)
      .leftJoin(user, eq(user.id, batchReview.actorId))
      .where(eq(batchReview.batchId, b.id))
      .orderBy(desc(batchReview.createdAt));
    res.json({ reviews: rows });
  });

  /** POST /api/batches/:id/submit { comment? } — a test engineer hands a batch to the QA leads (e-mailed). */
  r.post('/:id/submit', requirePermission('batch:submit'), validate(submitSchema), async (req, res) => {
    const c = callerOf(req);
    const b = await loadBatch(db, req);
    if (b.archived) throw new HttpError(409, 'batch_archived', 'Restore the batch from the archive before submitting it.');
    if (b.state === 'released') throw new HttpError(409, 'batch_released', 'This batch is already released.');
    if (b.state === 'in_review') throw new HttpError(409, 'already_in_review', 'This batch is already waiting for review.');
    const devices = await deviceRecords(db, [b.id]);
    if (!devices.length) throw new HttpError(409, 'batch_empty', 'Upload curves before submitting the batch for review.');
    const unfitted = devices.filter((d) => !d.fitted);
    if (unfitted.length) {
      throw new HttpError(409, 'unfitted_curves', `${unfitted.length} curve(s) have no converged fit (${unfitted.slice(0, 5).map((d) => d.deviceId).join(', ')}${unfitted.length > 5 ? ', …' : ''}). Refit or remove them first.`);
    }
    await db.transaction(async (tx) => {
      await touchBatch(tx, b.id, { state: 'in_review' });
      await tx.insert(batchReview).values({ id: crypto.randomUUID(), batchId: b.id, action: 'submitted', counts: { total: devices.length }, comment: req.body.comment || null, actorId: c.user.id });
    });
    const leads = await db
      .select({ email: user.email, name: user.name })
      .from(member)
      .innerJoin(user, eq(user.id, member.userId))
      .where(and(eq(member.organizationId, c.organization.id), eq(member.role, 'qa_lead')));
    for (const l of leads) {
      await mailer.send({
        to: l.email,
        kind: 'review-request',
        organizationId: c.organization.id,
        subject: `Quasilevel: batch “${b.name}” is ready for review`,
        text: [
          `Hello ${l.name},`,
          '',
          `${c.user.name} submitted the batch “${b.name}” (${devices.length} devices) for release review.`,
          req.body.comment ? `Their note: ${req.body.comment}` : '',
          '',
          'Open the batch in Quasilevel, judge it against an acceptance spec and release it or put it on hold.',
        ]
          .filter((x) => x !== null)
          .join('\n'),
      });
    }
    const [after] = await db.select().from(batch).where(eq(batch.id, b.id));
    res.json({ batch: batchJson(after), notified: leads.length });
  });

  /**
   * POST /api/batches/:id/decision { decision: 'release'|'hold', specId, comment } — the QA lead's
   * decision, recorded with the spec version and the pass/fail counts; the submitter is e-mailed.
   * A released batch becomes read-only.
   */
  r.post('/:id/decision', requirePermission('release:decide'), validate(decisionSchema), async (req, res) => {
    const c = callerOf(req);
    const b = await loadBatch(db, req);
    if (b.state !== 'in_review') {
      throw new HttpError(409, 'not_in_review', b.state === 'released' ? 'This batch is already released.' : 'Only a batch submitted for review can be released or held.');
    }
    const body = req.body as ReturnType<typeof decisionSchema.parse>;
    const { specRow, evaluation, devices } = await evaluate(db, b.id, c.organization.id, body.specId);
    const unfitted = devices.filter((d) => !d.fitted);
    if (body.decision === 'release' && unfitted.length) {
      throw new HttpError(409, 'unfitted_curves', `${unfitted.length} curve(s) have no converged fit; the batch cannot be released.`);
    }
    const state = body.decision === 'release' ? 'released' : 'on_hold';
    const tally = counts(evaluation);
    await db.transaction(async (tx) => {
      await touchBatch(tx, b.id, { state });
      await tx.insert(batchReview).values({ id: crypto.randomUUID(), batchId: b.id, action: body.decision === 'release' ? 'released' : 'held', specId: specRow.id, counts: tally, comment: body.comment || null, actorId: c.user.id });
    });
    const [submission] = await db
      .select({ email: user.email, name: user.name })
      .from(batchReview)
      .innerJoin(user, eq(user.id, batchReview.actorId))
      .where(and(eq(batchReview.batchId, b.id), eq(batchReview.action, 'submitted')))
      .orderBy(desc(batchReview.createdAt))
      .limit(1);
    if (submission) {
      await mailer.send({
        to: submission.email,
        kind: 'release-decision',
        organizationId: c.organization.id,
        subject: `Quasilevel: batch “${b.name}” was ${state === 'released' ? 'released' : 'put on hold'}`,
        text: [
          `Hello ${submission.name},`,
          '',
          `${c.user.name} ${state === 'released' ? 'released' : 'put on hold'} the batch “${b.name}”.`,
          `Judged against ${specRow.name} v${specRow.version}: ${tally.pass} pass, ${tally.fail} fail, ${tally.outliers} outliers of ${tally.total}.`,
          body.comment ? `Comment: ${body.comment}` : '',
        ].join('\n'),
      });
    }
    const [after] = await db.select().from(batch).where(eq(batch.id, b.id));
    res.json({ batch: batchJson(after), counts: tally, spec: { id: specRow.id, version: specRow.version, name: specRow.name } });
  });

  return r;
}
