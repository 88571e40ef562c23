import { Router } from 'express';
import type { Request } from 'express';
import type { Db } from '@/db/client';
import { decisionSchema, reopenSchema, submitSchema } from '@/lib/schemas/quality';
import type { Mailer } from '@/server/mail';
import { callerOf, requirePermission } from '@/server/permissions';
import { releaseCsv, releaseDetail, reopenBatch } from '@/server/services/releases';
import { batchReportPdf } from '@/server/services/report';
import { batchEvaluation, decideBatch, passFailExport, reviewHistory, submitBatch } from '@/server/services/reviews';
import { sendCsv } from '@/server/send-csv';
import { validate } from '@/server/validate';

/** The ?spec=<id> of a request, if any. */
const specParam = (req: Request) => String(req.query.spec ?? '') || undefined;

/** Review, release and export routes of a batch (mounted under /api/batches). */
export function reviewsRouter(db: Db, mailer: Mailer, baseUrl = ''): Router {
  const r = Router();

  /** GET /api/batches/:id/evaluation?spec=<specId> — every device judged against that spec version (default: the last decision's). */
  r.get('/:id/evaluation', requirePermission('batch:read'), async (req, res) => {
    res.json(await batchEvaluation(db, callerOf(req).organization.id, String(req.params.id), specParam(req)));
  });

  /**
   * GET /api/batches/:id/pass-fail.csv?spec=<specId> — one header row and one row per device:
   * device_id, batch_name, result, reasons, power_class, outlier, outlier_params, key figures (units
   * in the column names, FF and efficiency in %), spec_name, spec_version, release_state, exported_at.
   * Cells that a spreadsheet would run as a formula are escaped. Without ?spec, the spec of the
   * batch's last review decision is used.
   */
  r.get('/:id/pass-fail.csv', requirePermission('batch:read'), async (req, res) => {
    sendCsv(res, await passFailExport(db, callerOf(req).organization.id, String(req.params.id), specParam(req)));
  });

  /**
   * GET /api/batches/:id/report.pdf?spec=<specId> — the release report (PDF): facts, spec and limits,
   * counts, power classes, devices with results and reasons, Pmax and FF against the limits, flags,
   * sign-off and the high-voltage caution. A released batch's comes from its release record.
   */
  r.get('/:id/report.pdf', requirePermission('batch:read'), async (req, res) => {
    const pdf = await batchReportPdf(db, callerOf(req).organization.id, String(req.params.id), specParam(req));
    res.type('application/pdf').setHeader('Content-Disposition', `attachment; filename="${pdf.fileName}"`);
    res.send(pdf.bytes);
  });

  /**
   * GET /api/batches/:id/reviews — the review record (who did what, when, against which spec, with
   * which counts; `release_id` on releases), every release (`releases`, newest first) and whether
   * the caller may release the batch (`release_check`).
   */
  r.get('/:id/reviews', requirePermission('batch:read'), async (req, res) => {
    res.json(await reviewHistory(db, callerOf(req), String(req.params.id)));
  });

  /** GET /api/batches/:id/releases/:releaseId — one release as frozen: spec version, counts, each device's figures, result and data hash. */
  r.get('/:id/releases/:releaseId', requirePermission('batch:read'), async (req, res) => {
    res.json(await releaseDetail(db, callerOf(req).organization.id, String(req.params.id), String(req.params.releaseId)));
  });

  /** GET /api/batches/:id/releases/:releaseId/pass-fail.csv — the pass/fail CSV that release shipped, byte for byte. */
  r.get('/:id/releases/:releaseId/pass-fail.csv', requirePermission('batch:read'), async (req, res) => {
    sendCsv(res, await releaseCsv(db, callerOf(req).organization.id, String(req.params.id), String(req.params.releaseId)));
  });

  /**
   * POST /api/batches/:id/reopen { reason } — a QA lead reopens a released batch with a written
   * reason; it goes on hold as the next revision, its releases stay readable.
   */
  r.post('/:id/reopen', requirePermission('release:decide'), validate(reopenSchema), async (req, res) => {
    res.json(await reopenBatch(db, callerOf(req), String(req.params.id), (req.body as ReturnType<typeof reopenSchema.parse>).reason));
  });

  /** POST /api/batches/:id/submit { comment? } — a test engineer hands a batch to the QA leads (e-mailed). */
  r.post('/:id/submit', requirePermission('batch:submit'), validate(submitSchema), async (req, res) => {
    res.json(await submitBatch(db, mailer, callerOf(req), String(req.params.id), (req.body as ReturnType<typeof submitSchema.parse>).comment, baseUrl));
  });

  /**
   * POST /api/batches/:id/decision { decision: 'release'|'hold', spec_id, comment } — the QA lead's
   * decision, recorded with the spec version and the pass/fail counts; the submitter is e-mailed.
   * A release needs a comment when a device fails (400), is refused to the batch's submitter or
   * uploaders (403 same_person) and writes the release record; the batch becomes read-only.
   */
  r.post('/:id/decision', requirePermission('release:decide'), validate(decisionSchema), async (req, res) => {
    res.json(await decideBatch(db, mailer, callerOf(req), String(req.params.id), req.body as ReturnType<typeof decisionSchema.parse>, baseUrl));
  });

  return r;
}
