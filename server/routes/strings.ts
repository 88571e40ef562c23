import { Router } from 'express';
import type { Db } from '@/db/client';
import { can } from '@/lib/auth/roles';
import { stringSizeSchema } from '@/lib/schemas/strings';
import type { StringSizeRequest } from '@/lib/schemas/strings';
import { HttpError } from '@/server/errors';
import { callerOf, requirePermission } from '@/server/permissions';
import { sizeStringFor } from '@/server/services/strings';
import { validate } from '@/server/validate';

/** /api/strings — string voltage sizing from a batch, one curve or typed values. */
export function stringsRouter(db: Db): Router {
  const r = Router();

  /**
   * POST /api/strings/size — most modules per series string below the system voltage limit on
   * the coldest morning, least modules for the inverter's MPP window when hot, and the margin
   * (server/services/strings.ts says where each value comes from). Reading a batch or a curve
   * needs batch:read as well. 404 for another organisation's batch or curve, 400 for a malformed
   * request, 422 with lib/strings' message when the numbers cannot be sized.
   */
  r.post('/size', requirePermission('physics:use'), validate(stringSizeSchema), async (req, res) => {
    const c = callerOf(req);
    const body = req.body as StringSizeRequest;
    if ((body.batch_id || body.curve_id) && !can(c.role, 'batch:read')) {
      throw new HttpError(403, 'forbidden', `Your role (${c.role}) may not read batches: it needs batch:read. Type the module's values instead.`);
    }
    res.json(await sizeStringFor(db, c.organization.id, body));
  });

  return r;
}
