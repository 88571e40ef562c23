import { Router } from 'express';
import type { Db } from '@/db/client';
import { organisationSettingsSchema } from '@/lib/schemas/auth';
import { actorOf, callerOf, requirePermission } from '@/server/permissions';
import { listAudit } from '@/server/services/audit';
import { organisationSettings, updateOrganisationSettings } from '@/server/services/membership';
import { validate } from '@/server/validate';

/** /api/organization — the administrators' settings and the record of membership changes (admins only). */
export function organizationRouter(db: Db): Router {
  const r = Router();
  r.use(requirePermission('users:manage'));

  /** GET /api/organization — name, domain, `join_by_domain` and `separate_release`. */
  r.get('/', async (req, res) => {
    res.json(await organisationSettings(db, callerOf(req).organization.id));
  });

  /**
   * PATCH /api/organization { join_by_domain?, separate_release? } — let verified addresses of the
   * domain join at once (true) or ask (false); keep whoever uploaded or submitted a batch from
   * releasing it (true, the default) or not.
   */
  r.patch('/', validate(organisationSettingsSchema), async (req, res) => {
    res.json(await updateOrganisationSettings(db, actorOf(req), req.body));
  });

  /** GET /api/organization/audit — who changed what about the members, newest first (200). */
  r.get('/audit', async (req, res) => {
    res.json(await listAudit(db, callerOf(req).organization.id));
  });
  return r;
}
