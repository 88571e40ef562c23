import { Router } from 'express';
import type { Db } from '@/db/client';
import { accountOf } from '@/server/permissions';
import { describeAccount } from '@/server/services/membership';

/**
 * GET /api/me — the signed-in person, verified or not: their organisation, role and permissions
 * when they are an active member, `email_verified`, and `account_state` (active,
 * email_unverified, awaiting_approval, refused, no_organisation, deactivated) with any request to join.
 */
export function meRouter(db: Db): Router {
  const r = Router();
  r.get('/', async (req, res) => {
    res.json(await describeAccount(db, accountOf(req)));
  });
  return r;
}
