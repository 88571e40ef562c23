/** The organisation's members and their roles, and the mail sent for it (admins' screens). */
import { and, asc, desc, eq } from 'drizzle-orm';
import type { Db } from '@/db/client';
import { mailLog, member, user } from '@/db/schema';
import type { Role } from '@/lib/auth/roles';
import type { OutboxOut, UserListOut } from '@/lib/schemas/responses';
import type { Auth } from '@/server/auth';
import { HttpError } from '@/server/errors';

/** Everyone in the organisation, by name. */
export async function listUsers(db: Db, organizationId: string) {
  const rows = await db
    .select({ id: user.id, name: user.name, email: user.email, role: member.role, member_id: member.id, joined_at: member.createdAt })
    .from(member)
    .innerJoin(user, eq(member.userId, user.id))
    .where(eq(member.organizationId, organizationId))
    .orderBy(asc(user.name));
  return { users: rows.map((r) => ({ ...r, role: r.role as Role })) } satisfies UserListOut;
}

/**
 * Changes a member's role through better-auth's organization plugin (with the caller's own
 * session headers, so the plugin checks them too); 409 when the last administrator would demote themself.
 */
export async function changeRole(db: Db, auth: Auth, by: { organizationId: string; userId: string; headers: Headers }, userId: string, role: Role) {
  const [m] = await db.select().from(member).where(and(eq(member.userId, userId), eq(member.organizationId, by.organizationId)));
  if (!m) throw new HttpError(404, 'not_found', 'No such user in your organisation.');
  if (m.userId === by.userId && role !== 'admin') {
    const admins = await db.select().from(member).where(and(eq(member.organizationId, by.organizationId), eq(member.role, 'admin')));
    if (admins.length <= 1) throw new HttpError(409, 'last_admin', 'You are the only administrator; make someone else administrator first.');
  }
  await auth.api.updateMemberRole({ headers: by.headers, body: { memberId: m.id, role, organizationId: by.organizationId } });
  return { id: m.userId, role };
}

/** The last 200 messages sent for the organisation, newest first. */
export async function outbox(db: Db, organizationId: string) {
  const rows = await db.select().from(mailLog).where(eq(mailLog.organizationId, organizationId)).orderBy(desc(mailLog.createdAt)).limit(200);
  return { messages: rows.map((m) => ({ id: m.id, to: m.to, subject: m.subject, body: m.body, kind: m.kind, transport: m.transport, file: m.file, created_at: m.createdAt })) } satisfies OutboxOut;
}
