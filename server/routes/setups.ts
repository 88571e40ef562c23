import { Router } from 'express';
import { setupInputSchema, setupPatchSchema } from '@/lib/quality/uncertainty';
import { callerOf, requirePermission } from '@/server/permissions';
import { createSetup, editSetup, listSetups, setupDetail } from '@/server/services/setups';
import { validate } from '@/server/validate';
import type { Db } from '@/db/client';

/** /api/setups — measurement setups with their uncertainty budgets: QA leads write, everyone reads. */
export function setupsRouter(db: Db): Router {
  const r = Router();

  /** GET /api/setups — every setup of the organisation, the default first. */
  r.get('/', requirePermission('spec:read'), async (req, res) => {
    res.json(await listSetups(db, callerOf(req).organization.id));
  });

  /** GET /api/setups/:id — one setup with its components and expanded uncertainties. */
  r.get('/:id', requirePermission('spec:read'), async (req, res) => {
    res.json(await setupDetail(db, callerOf(req).organization.id, String(req.params.id)));
  });

  /** POST /api/setups { name, components: [{ name, acts_on, value, unit, distribution, k? }], is_default? } */
  r.post('/', requirePermission('spec:write'), validate(setupInputSchema), async (req, res) => {
    const c = callerOf(req);
    res.status(201).json(await createSetup(db, { organizationId: c.organization.id, userId: c.user.id }, req.body as ReturnType<typeof setupInputSchema.parse>));
  });

  /** PATCH /api/setups/:id { name?, components?, is_default: true? } */
  r.patch('/:id', requirePermission('spec:write'), validate(setupPatchSchema), async (req, res) => {
    res.json(await editSetup(db, callerOf(req).organization.id, String(req.params.id), req.body as ReturnType<typeof setupPatchSchema.parse>));
  });
  return r;
}
