import { desc, eq } from 'drizzle-orm';
import { Router } from 'express';
import type { Db } from '@/db/client';
import { mailLog } from '@/db/schema';
import { callerOf, requirePermission } from '@/server/permissions';

/** GET /api/outbox — the last 200 messages sent for the caller's organisation (admins). */
export function outboxRouter(db: Db): Router {
  const r = Router();
  r.get('/', requirePermission('outbox:read'), async (req, res) => {
    const c = callerOf(req);
    const rows = await db
      .select()
      .from(mailLog)
      .where(eq(mailLog.organizationId, c.organization.id))
      .orderBy(desc(mailLog.createdAt))
      .limit(200);
    res.json({ messages: rows });
  });
  return r;
}
