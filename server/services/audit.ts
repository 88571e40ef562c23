/** The record of membership changes: who did what to whom, and when (the admins' users screen lists it). */
import { desc, eq } from 'drizzle-orm';
import type { Db } from '@/db/client';
import { auditLog } from '@/db/schema';
import type { AuditAction } from '@/lib/auth/audit';

/** A database handle or an open transaction. */
export type Tx = Pick<Db, 'insert' | 'select' | 'update' | 'delete'>;

/** Who acted: a signed-in administrator, or null when the product acted (joining on verification). */
export type Actor = { userId: string; name: string; email: string } | null;

export type AuditEntry = {
  organizationId: string;
  actor: Actor;
  action: AuditAction;
  subject?: { userId?: string | null; name?: string | null; email: string } | null;
  details?: Record<string, string | boolean | null>;
};

/** Writes one audit entry (inside the caller's transaction, so the change and its record commit together). */
export async function recordAudit(tx: Tx, e: AuditEntry): Promise<void> {
  await tx.insert(auditLog).values({
    id: crypto.randomUUID(),
    organizationId: e.organizationId,
    actorId: e.actor?.userId ?? null,
    actorName: e.actor ? `${e.actor.name} <${e.actor.email}>` : null,
    action: e.action,
    subjectUserId: e.subject?.userId ?? null,
    subjectName: e.subject?.name ?? null,
    subjectEmail: e.subject?.email ?? null,
    details: e.details ?? null,
  });
}

/** The organisation's last 200 audit entries, newest first. */
export async function listAudit(db: Db, organizationId: string) {
  const rows = await db.select().from(auditLog).where(eq(auditLog.organizationId, organizationId)).orderBy(desc(auditLog.createdAt)).limit(200);
  return {
    entries: rows.map((r) => ({
      id: r.id,
      action: r.action as AuditAction,
      actor_name: r.actorName,
      subject_name: r.subjectName,
      subject_email: r.subjectEmail,
      details: r.details ?? {},
      created_at: r.createdAt.toISOString(),
    })),
  };
}
