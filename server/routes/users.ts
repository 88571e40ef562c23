import { Router } from 'express';
import type { Db } from '@/db/client';
import { memberActiveSchema, roleChangeSchema } from '@/lib/schemas/auth';
import { actorOf, callerOf, requirePermission } from '@/server/permissions';
import { changeRole, listUsers, removeMember, setActive } from '@/server/services/users';
import { validate } from '@/server/validate';

/** /api/users — the organisation's members and their roles (admins only); every change is recorded. */
export function usersRouter(db: Db): Router {
  const r = Router();
  r.use(requirePermission('users:manage'));

  /** GET /api/users — everyone in the caller's organisation, with `active`. */
  r.get('/', async (req, res) => {
    res.json(await listUsers(db, callerOf(req).organization.id));
  });

  /** PATCH /api/users/:id/role { role } — change a member's role; 409 when no active administrator would remain. */
  r.patch('/:id/role', validate(roleChangeSchema), async (req, res) => {
    res.json(await changeRole(db, actorOf(req), String(req.params.id), req.body.role));
  });

  /** PATCH /api/users/:id/active { active } — deactivate (signs them out everywhere) or reactivate a member. */
  r.patch('/:id/active', validate(memberActiveSchema), async (req, res) => {
    res.json(await setActive(db, actorOf(req), String(req.params.id), req.body.active));
  });

  /** DELETE /api/users/:id — remove a member from the organisation (their account and records stay). */
  r.delete('/:id', async (req, res) => {
    res.json(await removeMember(db, actorOf(req), String(req.params.id)));
  });
  return r;
}
