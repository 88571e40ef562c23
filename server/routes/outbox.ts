import { Router } from 'express';
import type { Db } from '@/db/client';
import { callerOf, requirePermission } from '@/server/permissions';
import { outbox } from '@/server/services/users';

/** GET /api/outbox — the last 200 messages sent for the caller's organisation (admins). */
export function outboxRouter(db: Db): Router {
  const r = Router();
  r.get('/', requirePermission('outbox:read'), async (req, res) => {
    res.json(await outbox(db, callerOf(req).organization.id));
  });
  return r;
}
