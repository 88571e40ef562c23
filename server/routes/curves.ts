import { Router } from 'express';
import type { Db } from '@/db/client';
import { refitSchema } from '@/lib/schemas/curves';
import { callerOf, requirePermission } from '@/server/permissions';
import { inlineAnalyser } from '@/server/services/analysis-pool';
import type { Analyser } from '@/server/services/analysis-pool';
import { curveDetail, refitCurve } from '@/server/services/curves';
import { validate } from '@/server/validate';

/** /api/curves — one curve with everything known about it, and refits. */
export function curvesRouter(db: Db, analyser: Analyser = inlineAnalyser()): Router {
  const r = Router();

  /** GET /api/curves/:id — points, key figures, current fits with residuals, STC figures, fit history. */
  r.get('/:id', requirePermission('batch:read'), async (req, res) => {
    res.json(await curveDetail(db, callerOf(req).organization.id, String(req.params.id)));
  });

  /**
   * POST /api/curves/:id/refit — fit again with another model or corrected metadata. Earlier fits
   * stay in the history; the new ones become current. Key figures and STC figures follow the new metadata.
   */
  r.post('/:id/refit', requirePermission('batch:write'), validate(refitSchema), async (req, res) => {
    const c = callerOf(req);
    res.json(await refitCurve(db, analyser, { organizationId: c.organization.id, userId: c.user.id }, String(req.params.id), req.body as ReturnType<typeof refitSchema.parse>));
  });

  return r;
}
