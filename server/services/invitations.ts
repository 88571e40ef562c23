/**
 * Invitations by e-mail with a role, kept in better-auth's `invitation` table (the organization
 * plugin's own endpoints are closed over HTTP; see server/permissions.ts). The plugin's accept
 * endpoint needs the invitee signed in and calling it with the invitation's id; here the invitation
 * applies when the invited address is verified (server/services/membership.ts), which proves the
 * same thing without a second step, and every change is recorded in the audit log.
 */
import { and, desc, eq, gt } from 'drizzle-orm';
import type { Db } from '@/db/client';
import { invitation, member, organization, user } from '@/db/schema';
import type { Role } from '@/lib/auth/roles';
import { HttpError } from '@/server/errors';
import type { Mailer } from '@/server/mail';
import { invitationMail } from '@/server/services/account-mails';
import { recordAudit } from '@/server/services/audit';
import { applyInvitation } from '@/server/services/membership';
import type { AdminActor } from '@/server/services/membership';

/** How long an invitation stays valid. */
export const INVITATION_DAYS = 7;

/** Pending, unexpired invitations of the organisation, newest first. */
export async function listInvitations(db: Db, organizationId: string) {
  const rows = await db
    .select({ id: invitation.id, email: invitation.email, role: invitation.role, expires_at: invitation.expiresAt, created_at: invitation.createdAt, invited_by: user.name })
    .from(invitation)
    .leftJoin(user, eq(invitation.inviterId, user.id))
    .where(and(eq(invitation.organizationId, organizationId), eq(invitation.status, 'pending'), gt(invitation.expiresAt, new Date())))
    .orderBy(desc(invitation.createdAt));
  return { invitations: rows.map((r) => ({ ...r, expires_at: r.expires_at.toISOString(), created_at: r.created_at.toISOString() })) };
}

/**
 * Invites `email` with `role` and mails the invitation. A pending invitation of the same address
 * is replaced. When the address already has a verified account that belongs to no organisation
 * (it asked to join, or was removed), the invitation applies at once.
 */
export async function invite(db: Db, mailer: Mailer, baseUrl: string, by: AdminActor, email: string, role: Role) {
  const address = email.trim().toLowerCase();
  const expiresAt = new Date(Date.now() + INVITATION_DAYS * 24 * 3600 * 1000);
  const done = await db.transaction(async (tx) => {
    const [already] = await tx
      .select({ id: member.id })
      .from(member)
      .innerJoin(user, eq(member.userId, user.id))
      .where(and(eq(user.email, address), eq(member.organizationId, by.organizationId)));
    if (already) throw new HttpError(409, 'already_member', `${address} is already a member of your organisation.`);
    await tx
      .update(invitation)
      .set({ status: 'canceled' })
      .where(and(eq(invitation.organizationId, by.organizationId), eq(invitation.email, address), eq(invitation.status, 'pending')));
    const id = crypto.randomUUID();
    await tx.insert(invitation).values({ id, organizationId: by.organizationId, email: address, role, status: 'pending', expiresAt, inviterId: by.userId });
    await recordAudit(tx, { organizationId: by.organizationId, actor: by, action: 'invited', subject: { email: address }, details: { role } });
    const [u] = await tx.select().from(user).where(eq(user.email, address));
    let joined = false;
    if (u?.emailVerified) {
      const [elsewhere] = await tx.select({ id: member.id }).from(member).where(eq(member.userId, u.id)).limit(1);
      if (!elsewhere) joined = await applyInvitation(tx, u);
    }
    const [org] = await tx.select({ name: organization.name }).from(organization).where(eq(organization.id, by.organizationId));
    return { id, joined, orgName: org.name };
  });
  await mailer.send({ ...invitationMail(done.orgName, by.name, role, baseUrl, expiresAt), to: address, organizationId: by.organizationId });
  return { id: done.id, email: address, role, status: done.joined ? 'accepted' : 'pending', expires_at: expiresAt.toISOString() };
}

/** Withdraws a pending invitation (recorded). */
export async function cancelInvitation(db: Db, by: AdminActor, id: string) {
  await db.transaction(async (tx) => {
    const [inv] = await tx.select().from(invitation).where(and(eq(invitation.id, id), eq(invitation.organizationId, by.organizationId)));
    if (!inv) throw new HttpError(404, 'not_found', 'No such invitation in your organisation.');
    if (inv.status !== 'pending') throw new HttpError(409, 'not_pending', `This invitation is ${inv.status}, not pending.`);
    await tx.update(invitation).set({ status: 'canceled' }).where(eq(invitation.id, id));
    await recordAudit(tx, { organizationId: by.organizationId, actor: by, action: 'invitation_canceled', subject: { email: inv.email }, details: { role: inv.role } });
  });
  return { id, status: 'canceled' };
}
