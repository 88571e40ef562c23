import { Router } from 'express';
import { ROLE_PERMISSIONS } from '@/lib/auth/roles';
import { callerOf } from '@/server/permissions';

/** GET /api/me — the signed-in user, their organisation, role and permissions. */
export function meRouter(): Router {
  const r = Router();
  r.get('/', (req, res) => {
    const c = callerOf(req);
    res.json({
      user: { ...c.user, role: c.role },
      organization: c.organization,
      role: c.role,
      permissions: ROLE_PERMISSIONS[c.role],
    });
  });
  return r;
}
