import { Router } from 'express';
import type { Db } from '@/db/client';
import { callerOf, requirePermission } from '@/server/permissions';
import type { Analyser } from '@/server/services/analysis-pool';
import { batchFitStatus, cancelBatchFits } from '@/server/services/analysis-jobs';

/** /api/batches/:id/fits — where a batch's fits are (queued jobs in PostgreSQL mode) and cancelling those not started. */
export function fitsRouter(db: Db, analyser: Analyser | undefined): Router {
  const r = Router();

  /** GET /api/batches/:id/fits — counts of the batch's curves by status: queued, fitting, done, failed. */
  r.get('/:id/fits', requirePermission('batch:read'), async (req, res) => {
    res.json(await batchFitStatus(db, callerOf(req).organization.id, String(req.params.id)));
  });

  /** POST /api/batches/:id/fits/cancel — the queued curves become failed ("cancelled by …") and their jobs are withdrawn. */
  r.post('/:id/fits/cancel', requirePermission('batch:write'), async (req, res) => {
    const c = callerOf(req);
    res.json(await cancelBatchFits(db, analyser ?? ({} as Analyser), { organizationId: c.organization.id, userName: c.user.name }, String(req.params.id)));
  });
  return r;
}
