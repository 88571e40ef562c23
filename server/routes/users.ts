import { fromNodeHeaders } from 'better-auth/node';
import { and, asc, eq } from 'drizzle-orm';
import { Router } from 'express';
import type { Db } from '@/db/client';
import { member, user } from '@/db/schema';
import { roleChangeSchema } from '@/lib/schemas/auth';
import type { Auth } from '@/server/auth';
import { HttpError } from '@/server/errors';
import { callerOf, requirePermission } from '@/server/permissions';
import { validate } from '@/server/validate';

/** /api/users — the organisation's users and their roles (admins only). */
export function usersRouter(db: Db, auth: Auth): Router {
  const r = Router();
  r.use(requirePermission('users:manage'));

  /** GET /api/users — everyone in the caller's organisation. */
  r.get('/', async (req, res) => {
    const c = callerOf(req);
    const rows = await db
      .select({ id: user.id, name: user.name, email: user.email, role: member.role, memberId: member.id, joinedAt: member.createdAt })
      .from(member)
      .innerJoin(user, eq(member.userId, user.id))
      .where(eq(member.organizationId, c.organization.id))
      .orderBy(asc(user.name));
    res.json({ users: rows });
  });

  /** PATCH /api/users/:id/role { role } — change a member's role through better-auth's organization plugin. */
  r.patch('/:id/role', validate(roleChangeSchema), async (req, res) => {
    const c = callerOf(req);
    const [m] = await db
      .select()
      .from(member)
      .where(and(eq(member.userId, String(req.params.id)), eq(member.organizationId, c.organization.id)));
    if (!m) throw new HttpError(404, 'not_found', 'No such user in your organisation.');
    if (m.userId === c.user.id && req.body.role !== 'admin') {
      const admins = await db.select().from(member).where(and(eq(member.organizationId, c.organization.id), eq(member.role, 'admin')));
      if (admins.length <= 1) {
        throw new HttpError(409, 'last_admin', 'You are the only administrator; make someone else administrator first.');
      }
    }
    await auth.api.updateMemberRole({
      headers: fromNodeHeaders(req.headers),
      body: { memberId: m.id, role: req.body.role, organizationId: c.organization.id },
    });
    res.json({ id: m.userId, role: req.body.role });
  });
  return r;
}
