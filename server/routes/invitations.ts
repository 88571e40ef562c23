import { Router } from 'express';
import type { Db } from '@/db/client';
import { inviteSchema } from '@/lib/schemas/auth';
import type { Mailer } from '@/server/mail';
import { actorOf, callerOf, requirePermission } from '@/server/permissions';
import { cancelInvitation, invite, listInvitations } from '@/server/services/invitations';
import { validate } from '@/server/validate';

/** /api/invitations — invitations by e-mail with a role (admins only). */
export function invitationsRouter(db: Db, mailer: Mailer, baseUrl: string): Router {
  const r = Router();
  r.use(requirePermission('users:manage'));

  /** GET /api/invitations — pending invitations of the caller's organisation. */
  r.get('/', async (req, res) => {
    res.json(await listInvitations(db, callerOf(req).organization.id));
  });

  /** POST /api/invitations { email, role } — invite and mail; 409 when the address is already a member. */
  r.post('/', validate(inviteSchema), async (req, res) => {
    res.status(201).json(await invite(db, mailer, baseUrl, actorOf(req), req.body.email, req.body.role));
  });

  /** DELETE /api/invitations/:id — withdraw a pending invitation. */
  r.delete('/:id', async (req, res) => {
    res.json(await cancelInvitation(db, actorOf(req), String(req.params.id)));
  });
  return r;
}
