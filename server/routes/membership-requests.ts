import { Router } from 'express';
import type { Db } from '@/db/client';
import { requestDecisionSchema } from '@/lib/schemas/auth';
import type { RequestDecisionInput } from '@/lib/schemas/auth';
import type { Mailer } from '@/server/mail';
import { actorOf, callerOf, requirePermission } from '@/server/permissions';
import { decideRequest, listRequests } from '@/server/services/membership';
import { validate } from '@/server/validate';

/** /api/membership-requests — verified newcomers asking to join (admins only). */
export function membershipRequestsRouter(db: Db, mailer: Mailer, baseUrl: string): Router {
  const r = Router();
  r.use(requirePermission('users:manage'));

  /** GET /api/membership-requests — pending requests, oldest first. */
  r.get('/', async (req, res) => {
    res.json(await listRequests(db, callerOf(req).organization.id));
  });

  /** POST /api/membership-requests/:id/decision { decision: 'approve', role } | { decision: 'refuse' } — the person is mailed the answer. */
  r.post('/:id/decision', validate(requestDecisionSchema), async (req, res) => {
    const body = req.body as RequestDecisionInput;
    const answer = body.decision === 'approve' ? ({ approve: true, role: body.role } as const) : ({ approve: false } as const);
    res.json(await decideRequest(db, mailer, baseUrl, actorOf(req), String(req.params.id), answer));
  });
  return r;
}
