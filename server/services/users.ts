/**
 * The organisation's members: list, change a role, deactivate, reactivate, remove; and the mail
 * sent for the organisation (admins' screens). Every change is made with its audit entry in one
 * transaction, and the organisation always keeps one active administrator.
 */
import { and, asc, desc, eq, isNull, ne } from 'drizzle-orm';
import type { Db } from '@/db/client';
import { mailLog, member, session, user } from '@/db/schema';
import type { Role } from '@/lib/auth/roles';
import type { OutboxOut, UserListOut } from '@/lib/schemas/responses';
import type { Auth } from '@/server/auth';
import { HttpError } from '@/server/errors';
import { recordAudit } from '@/server/services/audit';
import type { Tx } from '@/server/services/audit';
import type { AdminActor } from '@/server/services/membership';

/** Everyone in the organisation, by name. */
export async function listUsers(db: Db, organizationId: string) {
  const rows = await db
    .select({ id: user.id, name: user.name, email: user.email, role: member.role, member_id: member.id, joined_at: member.createdAt, deactivatedAt: member.deactivatedAt })
    .from(member)
    .innerJoin(user, eq(member.userId, user.id))
    .where(eq(member.organizationId, organizationId))
    .orderBy(asc(user.name));
  return {
    users: rows.map(({ deactivatedAt, ...r }) => ({ ...r, role: r.role as Role, active: !deactivatedAt, deactivated_at: deactivatedAt?.toISOString() ?? null })),
  } satisfies UserListOut;
}

/** The member `userId` of the actor's organisation, or 404. */
async function memberOf(tx: Tx, by: AdminActor, userId: string) {
  const [m] = await tx
    .select({ id: member.id, userId: member.userId, role: member.role, deactivatedAt: member.deactivatedAt, name: user.name, email: user.email })
    .from(member)
    .innerJoin(user, eq(member.userId, user.id))
    .where(and(eq(member.userId, userId), eq(member.organizationId, by.organizationId)));
  if (!m) throw new HttpError(404, 'not_found', 'No such user in your organisation.');
  return m;
}

/** 409 unless an active administrator other than `memberId` remains. */
async function keepAnAdmin(tx: Tx, organizationId: string, memberId: string, what: string) {
  const others = await tx
    .select({ id: member.id })
    .from(member)
    .where(and(eq(member.organizationId, organizationId), eq(member.role, 'admin'), isNull(member.deactivatedAt), ne(member.id, memberId)));
  if (!others.length) throw new HttpError(409, 'last_admin', `${what} would leave the organisation without an active administrator; make someone else administrator first.`);
}

/** Signs the person out everywhere, so a change of access applies at once. */
async function revokeSessions(tx: Tx, userId: string) {
  await tx.delete(session).where(eq(session.userId, userId));
}

/** Changes a member's role (recorded with both roles). */
export async function changeRole(db: Db, by: AdminActor, userId: string, role: Role) {
  return db.transaction(async (tx) => {
    const m = await memberOf(tx, by, userId);
    if (m.role === role) return { id: m.userId, role };
    if (m.role === 'admin') await keepAnAdmin(tx, by.organizationId, m.id, m.userId === by.userId ? 'Giving up your administrator role' : `Changing the role of ${m.name}`);
    await tx.update(member).set({ role }).where(eq(member.id, m.id));
    await recordAudit(tx, { organizationId: by.organizationId, actor: by, action: 'role_changed', subject: m, details: { from_role: m.role, to_role: role } });
    return { id: m.userId, role };
  });
}

/** Deactivates (no access, sessions ended, records kept) or reactivates a member. */
export async function setActive(db: Db, by: AdminActor, userId: string, active: boolean) {
  return db.transaction(async (tx) => {
    const m = await memberOf(tx, by, userId);
    if (!active && m.userId === by.userId) throw new HttpError(409, 'self', 'You cannot deactivate yourself.');
    if (active === !m.deactivatedAt) return { id: m.userId, active };
    if (!active && m.role === 'admin') await keepAnAdmin(tx, by.organizationId, m.id, `Deactivating ${m.name}`);
    await tx.update(member).set({ deactivatedAt: active ? null : new Date() }).where(eq(member.id, m.id));
    if (!active) await revokeSessions(tx, m.userId);
    await recordAudit(tx, { organizationId: by.organizationId, actor: by, action: active ? 'reactivated' : 'deactivated', subject: m, details: { role: m.role } });
    return { id: m.userId, active };
  });
}

/** Removes a member from the organisation (their account and what they made stay). */
export async function removeMember(db: Db, by: AdminActor, userId: string) {
  return db.transaction(async (tx) => {
    const m = await memberOf(tx, by, userId);
    if (m.userId === by.userId) throw new HttpError(409, 'self', 'You cannot remove yourself; ask another administrator.');
    if (m.role === 'admin') await keepAnAdmin(tx, by.organizationId, m.id, `Removing ${m.name}`);
    await tx.delete(member).where(eq(member.id, m.id));
    await revokeSessions(tx, m.userId);
    await recordAudit(tx, { organizationId: by.organizationId, actor: by, action: 'removed', subject: m, details: { role: m.role } });
    return { id: m.userId, removed: true };
  });
}

/** The last 200 messages sent for the organisation, newest first. */
export async function outbox(db: Db, organizationId: string) {
  const rows = await db.select().from(mailLog).where(eq(mailLog.organizationId, organizationId)).orderBy(desc(mailLog.createdAt)).limit(200);
  return { messages: rows.map((m) => ({ id: m.id, to: m.to, subject: m.subject, body: m.body, kind: m.kind, transport: m.transport, file: m.file, created_at: m.createdAt })) } satisfies OutboxOut;
}
