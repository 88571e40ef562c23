import { fromNodeHeaders } from 'better-auth/node';
import { Router } from 'express';
import type { Db } from '@/db/client';
import { roleChangeSchema } from '@/lib/schemas/auth';
import type { Auth } from '@/server/auth';
import { callerOf, requirePermission } from '@/server/permissions';
import { changeRole, listUsers } from '@/server/services/users';
import { validate } from '@/server/validate';

/** /api/users — the organisation's users and their roles (admins only). */
export function usersRouter(db: Db, auth: Auth): Router {
  const r = Router();
  r.use(requirePermission('users:manage'));

  /** GET /api/users — everyone in the caller's organisation. */
  r.get('/', async (req, res) => {
    res.json(await listUsers(db, callerOf(req).organization.id));
  });

  /** PATCH /api/users/:id/role { role } — change a member's role through better-auth's organization plugin. */
  r.patch('/:id/role', validate(roleChangeSchema), async (req, res) => {
    const c = callerOf(req);
    const by = { organizationId: c.organization.id, userId: c.user.id, headers: fromNodeHeaders(req.headers) };
    res.json(await changeRole(db, auth, by, String(req.params.id), req.body.role));
  });
  return r;
}
