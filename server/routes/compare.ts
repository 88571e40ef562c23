import { Router } from 'express';
import type { Db } from '@/db/client';
import { compareQuerySchema } from '@/lib/schemas/quality';
import { callerOf, requirePermission } from '@/server/permissions';
import { sendAnswer } from '@/server/services/answer-cache';
import { comparisons } from '@/server/services/compare';

/** /api/compare — several batches side by side for the comparison grid. */
export function compareRouter(db: Db): Router {
  const r = Router();
  const service = comparisons(db);

  /**
   * GET /api/compare?batches=a,b,…&spec=<specId>&param=pmp_w — one row per curve with every key
   * figure and fitted parameter (and pass/fail when a spec is given), sent per batch as columns
   * (`tables`, with `outliers` on `param` apart), statistics per batch and parameter (Cpk against
   * the spec's limits), and the Welch difference of means of `param` between each batch and the first.
   */
  r.get('/', requirePermission('batch:read'), async (req, res) => {
    sendAnswer(res, await service.compare(callerOf(req).organization.id, compareQuerySchema.parse(req.query)));
  });
  return r;
}
