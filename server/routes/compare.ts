import { Router } from 'express';
import type { Db } from '@/db/client';
import { compareQuerySchema } from '@/lib/schemas/quality';
import { callerOf, requirePermission } from '@/server/permissions';
import { sendAnswer } from '@/server/services/answer-cache';
import { comparisons } from '@/server/services/compare';
import { sendCsv } from '@/server/send-csv';

/** /api/compare — several batches side by side for the comparison grid, and as a CSV file. */
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

  /**
   * GET /api/compare/comparison.csv?batches=a,b,…&spec=<specId>&param=pmp_w — the comparison as a
   * CSV file: one header row and one row per curve with every column of the grid (units in the
   * column names, FF and efficiency in %), batch, spec, release state and export time on each row.
   */
  r.get('/comparison.csv', requirePermission('batch:read'), async (req, res) => {
    sendCsv(res, await service.compareCsv(callerOf(req).organization.id, compareQuerySchema.parse(req.query)));
  });
  return r;
}
