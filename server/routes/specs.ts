import { Router } from 'express';
import { specSaveSchema } from '@/lib/schemas/quality';
import { callerOf, requirePermission } from '@/server/permissions';
import { listSpecs, saveSpec, specDetail } from '@/server/services/specs';
import { validate } from '@/server/validate';
import type { Db } from '@/db/client';

/** /api/specs — versioned acceptance specs: QA leads write, everyone reads. */
export function specsRouter(db: Db): Router {
  const r = Router();

  /** GET /api/specs — the newest version of each spec. */
  r.get('/', requirePermission('spec:read'), async (req, res) => {
    res.json(await listSpecs(db, callerOf(req).organization.id));
  });

  /** GET /api/specs/:id — one version, with every version of its family (who changed what, when). */
  r.get('/:id', requirePermission('spec:read'), async (req, res) => {
    res.json(await specDetail(db, callerOf(req).organization.id, String(req.params.id)));
  });

  /**
   * POST /api/specs { name, limits: { <key>: { min?, max? } }, power_classes?, fail_flags?, notes?, family_id? }
   * — saves a new spec (version 1) or, with family_id, the next version of that spec. Returns it with id and version.
   */
  r.post('/', requirePermission('spec:write'), validate(specSaveSchema), async (req, res) => {
    const c = callerOf(req);
    res.status(201).json(await saveSpec(db, { organizationId: c.organization.id, userId: c.user.id }, req.body as ReturnType<typeof specSaveSchema.parse>));
  });
  return r;
}
