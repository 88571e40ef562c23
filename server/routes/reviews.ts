import { Router } from 'express';
import type { Request } from 'express';
import type { Db } from '@/db/client';
import { decisionSchema, submitSchema } from '@/lib/schemas/quality';
import type { Mailer } from '@/server/mail';
import { callerOf, requirePermission } from '@/server/permissions';
import { batchEvaluation, decideBatch, passFailExport, reviewHistory, submitBatch } from '@/server/services/reviews';
import { validate } from '@/server/validate';

/** The ?spec=<id> of a request, if any. */
const specParam = (req: Request) => String(req.query.spec ?? '') || undefined;

/** Review, release and export routes of a batch (mounted under /api/batches). */
export function reviewsRouter(db: Db, mailer: Mailer): Router {
  const r = Router();

  /** GET /api/batches/:id/evaluation?spec=<specId> — every device judged against that spec version (default: the last decision's). */
  r.get('/:id/evaluation', requirePermission('batch:read'), async (req, res) => {
    res.json(await batchEvaluation(db, callerOf(req).organization.id, String(req.params.id), specParam(req)));
  });

  /**
   * GET /api/batches/:id/pass-fail.csv?spec=<specId> — one row per device: device_id, result, reasons,
   * power_class, outlier, key figures, spec_version, release_state. Cells that a spreadsheet would run
   * as a formula are escaped. Without ?spec, the spec of the batch's last review decision is used.
   */
  r.get('/:id/pass-fail.csv', requirePermission('batch:read'), async (req, res) => {
    const csv = await passFailExport(db, callerOf(req).organization.id, String(req.params.id), specParam(req));
    res.setHeader('Content-Type', 'text/csv; charset=utf-8');
    res.setHeader('Content-Disposition', `attachment; filename="${csv.fileName}"`);
    res.send(csv.text);
  });

  /** GET /api/batches/:id/reviews — the review record: who did what, when, against which spec, with which counts. */
  r.get('/:id/reviews', requirePermission('batch:read'), async (req, res) => {
    res.json(await reviewHistory(db, callerOf(req).organization.id, String(req.params.id)));
  });

  /** POST /api/batches/:id/submit { comment? } — a test engineer hands a batch to the QA leads (e-mailed). */
  r.post('/:id/submit', requirePermission('batch:submit'), validate(submitSchema), async (req, res) => {
    res.json(await submitBatch(db, mailer, callerOf(req), String(req.params.id), (req.body as ReturnType<typeof submitSchema.parse>).comment));
  });

  /**
   * POST /api/batches/:id/decision { decision: 'release'|'hold', spec_id, comment } — the QA lead's
   * decision, recorded with the spec version and the pass/fail counts; the submitter is e-mailed.
   * A released batch becomes read-only.
   */
  r.post('/:id/decision', requirePermission('release:decide'), validate(decisionSchema), async (req, res) => {
    res.json(await decideBatch(db, mailer, callerOf(req), String(req.params.id), req.body as ReturnType<typeof decisionSchema.parse>));
  });

  return r;
}
