/**
 * How a person comes to belong to an organisation. Nothing happens at sign-up: when the address
 * is verified (`placeVerifiedUser`), a pending invitation for it applies; else the organisation
 * of the address's domain takes them at once if its administrators allow joining by domain, or
 * records a request to join and mails the administrators; a new domain founds an organisation
 * with them as its administrator. Also the requests' answers and the organisation's setting.
 */
import { and, asc, desc, eq, gt, isNull } from 'drizzle-orm';
import type { Db } from '@/db/client';
import { invitation, member, membershipRequest, organization, organizationSetting, user } from '@/db/schema';
import { isRole, ROLE_PERMISSIONS } from '@/lib/auth/roles';
import type { Role } from '@/lib/auth/roles';
import { HttpError } from '@/server/errors';
import type { Account } from '@/server/permissions';
import type { Mailer } from '@/server/mail';
import { joinRequestMail, requestAnsweredMail } from '@/server/services/account-mails';
import { recordAudit } from '@/server/services/audit';
import type { Actor, Tx } from '@/server/services/audit';

/** An administrator acting on their organisation. */
export type AdminActor = NonNullable<Actor> & { organizationId: string };

/** Lower-cased domain of an e-mail address, or null when it has none. */
export function emailDomain(email: string): string | null {
  const at = email.lastIndexOf('@');
  if (at < 0) return null;
  const d = email.slice(at + 1).trim().toLowerCase();
  return d || null;
}

/** Makes a URL-safe slug from a domain; uniqueness is the domain's. */
function slugFor(domain: string): string {
  return domain.replace(/[^a-z0-9]+/g, '-').replace(/^-|-$/g, '') || 'org';
}

/** Addresses of the organisation's active administrators. */
async function adminAddresses(tx: Tx, organizationId: string): Promise<string[]> {
  const rows = await tx
    .select({ email: user.email })
    .from(member)
    .innerJoin(user, eq(member.userId, user.id))
    .where(and(eq(member.organizationId, organizationId), eq(member.role, 'admin'), isNull(member.deactivatedAt)));
  return rows.map((r) => r.email);
}

/**
 * Applies the newest pending, unexpired invitation of `u`'s address, if any: membership with its
 * role, the invitation accepted, any request of theirs to that organisation approved. True when one applied.
 */
export async function applyInvitation(tx: Tx, u: { id: string; email: string; name: string }): Promise<boolean> {
  const [inv] = await tx
    .select()
    .from(invitation)
    .where(and(eq(invitation.email, u.email.toLowerCase()), eq(invitation.status, 'pending'), gt(invitation.expiresAt, new Date())))
    .orderBy(desc(invitation.createdAt))
    .limit(1);
  if (!inv) return false;
  const role: Role = isRole(inv.role) ? inv.role : 'test_engineer';
  await tx.insert(member).values({ id: crypto.randomUUID(), organizationId: inv.organizationId, userId: u.id, role });
  await tx.update(invitation).set({ status: 'accepted' }).where(eq(invitation.id, inv.id));
  await tx
    .update(membershipRequest)
    .set({ status: 'approved', role, decidedBy: inv.inviterId, decidedAt: new Date() })
    .where(and(eq(membershipRequest.organizationId, inv.organizationId), eq(membershipRequest.userId, u.id), eq(membershipRequest.status, 'pending')));
  await recordAudit(tx, { organizationId: inv.organizationId, actor: null, action: 'joined_by_invitation', subject: { userId: u.id, name: u.name, email: u.email }, details: { role } });
  return true;
}

/** Puts a person whose address was just verified into an organisation (see the file's comment). */
export async function placeVerifiedUser(db: Db, mailer: Mailer, baseUrl: string, u: { id: string; email: string; name: string }): Promise<void> {
  const domain = emailDomain(u.email);
  if (!domain) return;
  const subject = { userId: u.id, name: u.name, email: u.email };
  const toMail = await db.transaction(async (tx) => {
    const [existing] = await tx.select({ id: member.id }).from(member).where(eq(member.userId, u.id)).limit(1);
    if (existing) return null;
    if (await applyInvitation(tx, u)) return null;
    const [org] = await tx.select().from(organization).where(eq(organization.domain, domain));
    if (!org) {
      const orgId = crypto.randomUUID();
      await tx.insert(organization).values({ id: orgId, name: domain, slug: slugFor(domain), domain });
      await tx.insert(member).values({ id: crypto.randomUUID(), organizationId: orgId, userId: u.id, role: 'admin' });
      await recordAudit(tx, { organizationId: orgId, actor: null, action: 'organisation_founded', subject, details: { role: 'admin' } });
      return null;
    }
    if (org.joinByDomain) {
      await tx.insert(member).values({ id: crypto.randomUUID(), organizationId: org.id, userId: u.id, role: 'test_engineer' });
      await recordAudit(tx, { organizationId: org.id, actor: null, action: 'joined_by_domain', subject, details: { role: 'test_engineer' } });
      return null;
    }
    const inserted = await tx
      .insert(membershipRequest)
      .values({ id: crypto.randomUUID(), organizationId: org.id, userId: u.id })
      .onConflictDoNothing()
      .returning({ id: membershipRequest.id });
    if (!inserted.length) return null;
    await recordAudit(tx, { organizationId: org.id, actor: null, action: 'join_requested', subject });
    return { org, admins: await adminAddresses(tx, org.id) };
  });
  if (!toMail) return;
  const mail = joinRequestMail(toMail.org.name, u, baseUrl);
  for (const to of toMail.admins) await mailer.send({ ...mail, to, organizationId: toMail.org.id });
}

/** Requests to join the organisation that wait for an answer, oldest first. */
export async function listRequests(db: Db, organizationId: string) {
  const rows = await db
    .select({ id: membershipRequest.id, user_id: user.id, name: user.name, email: user.email, created_at: membershipRequest.createdAt })
    .from(membershipRequest)
    .innerJoin(user, eq(membershipRequest.userId, user.id))
    .where(and(eq(membershipRequest.organizationId, organizationId), eq(membershipRequest.status, 'pending')))
    .orderBy(asc(membershipRequest.createdAt));
  return { requests: rows.map((r) => ({ ...r, created_at: r.created_at.toISOString() })) };
}

/** Approves (with a role) or refuses a pending request; the person is mailed the answer. */
export async function decideRequest(db: Db, mailer: Mailer, baseUrl: string, by: AdminActor, requestId: string, answer: { approve: true; role: Role } | { approve: false }) {
  const done = await db.transaction(async (tx) => {
    const [r] = await tx
      .select({ id: membershipRequest.id, status: membershipRequest.status, userId: user.id, name: user.name, email: user.email })
      .from(membershipRequest)
      .innerJoin(user, eq(membershipRequest.userId, user.id))
      .where(and(eq(membershipRequest.id, requestId), eq(membershipRequest.organizationId, by.organizationId)));
    if (!r) throw new HttpError(404, 'not_found', 'No such request to join your organisation.');
    if (r.status !== 'pending') throw new HttpError(409, 'already_decided', `This request was already ${r.status}.`);
    const subject = { userId: r.userId, name: r.name, email: r.email };
    if (answer.approve) {
      const [elsewhere] = await tx.select({ id: member.id }).from(member).where(eq(member.userId, r.userId)).limit(1);
      if (elsewhere) throw new HttpError(409, 'already_member', `${r.name} already belongs to an organisation.`);
      await tx.insert(member).values({ id: crypto.randomUUID(), organizationId: by.organizationId, userId: r.userId, role: answer.role });
    }
    const status = answer.approve ? 'approved' : 'refused';
    await tx
      .update(membershipRequest)
      .set({ status, role: answer.approve ? answer.role : null, decidedBy: by.userId, decidedAt: new Date() })
      .where(eq(membershipRequest.id, r.id));
    await recordAudit(tx, {
      organizationId: by.organizationId,
      actor: by,
      action: answer.approve ? 'request_approved' : 'request_refused',
      subject,
      details: answer.approve ? { role: answer.role } : {},
    });
    const [org] = await tx.select({ name: organization.name }).from(organization).where(eq(organization.id, by.organizationId));
    return { r, orgName: org.name, status };
  });
  const mail = requestAnsweredMail(done.orgName, done.r.name, answer.approve ? { approved: true, role: answer.role } : { approved: false }, baseUrl);
  await mailer.send({ ...mail, to: done.r.email, organizationId: by.organizationId });
  return { id: requestId, status: done.status, ...(answer.approve ? { role: answer.role } : {}) };
}

/** The organisation as its administrators see it, with its settings (no settings row means the defaults). */
export async function organisationSettings(db: Db, organizationId: string) {
  const [o] = await db.select().from(organization).where(eq(organization.id, organizationId));
  if (!o) throw new HttpError(404, 'not_found', 'Your organisation was not found.');
  const [s] = await db.select({ separate: organizationSetting.separateRelease, years: organizationSetting.retentionYears }).from(organizationSetting).where(eq(organizationSetting.organizationId, organizationId));
  return { id: o.id, name: o.name, domain: o.domain, join_by_domain: o.joinByDomain, separate_release: s?.separate ?? true, retention_years: s?.years ?? 10 };
}

/**
 * Changes the organisation's settings — joining by e-mail domain, separation of duties at
 * release — each change with its audit entry, in one transaction.
 */
export async function updateOrganisationSettings(db: Db, by: AdminActor, change: { join_by_domain?: boolean; separate_release?: boolean; retention_years?: number }) {
  await db.transaction(async (tx) => {
    const orgId = by.organizationId;
    if (change.join_by_domain !== undefined) {
      await tx.update(organization).set({ joinByDomain: change.join_by_domain }).where(eq(organization.id, orgId));
      await recordAudit(tx, { organizationId: orgId, actor: by, action: 'setting_changed', details: { join_by_domain: change.join_by_domain } });
    }
    if (change.separate_release !== undefined) {
      const on = change.separate_release;
      await tx.insert(organizationSetting).values({ organizationId: orgId, separateRelease: on }).onConflictDoUpdate({ target: organizationSetting.organizationId, set: { separateRelease: on } });
      await recordAudit(tx, { organizationId: orgId, actor: by, action: 'setting_changed', details: { separate_release: on } });
    }
    if (change.retention_years !== undefined) {
      // Years the originals of a released batch are kept (server/services/originals-admin.ts).
      const years = change.retention_years;
      await tx.insert(organizationSetting).values({ organizationId: orgId, retentionYears: years }).onConflictDoUpdate({ target: organizationSetting.organizationId, set: { retentionYears: years } });
      await recordAudit(tx, { organizationId: orgId, actor: by, action: 'setting_changed', details: { retention_years: String(years) } });
    }
  });
  return organisationSettings(db, by.organizationId);
}

/** What stands between a signed-in person and the organisation's data, for /api/me. */
export async function joinRequestOf(db: Db, userId: string) {
  const [r] = await db
    .select({ status: membershipRequest.status, organization_name: organization.name, created_at: membershipRequest.createdAt })
    .from(membershipRequest)
    .innerJoin(organization, eq(membershipRequest.organizationId, organization.id))
    .where(eq(membershipRequest.userId, userId))
    .orderBy(desc(membershipRequest.createdAt))
    .limit(1);
  return r ? { status: r.status, organization_name: r.organization_name, created_at: r.created_at.toISOString() } : null;
}

/** Where a signed-in person stands: the one state the screens switch on. */
export type AccountState = 'active' | 'email_unverified' | 'awaiting_approval' | 'refused' | 'no_organisation' | 'deactivated';

/** The answer of GET /api/me: the person, their organisation and role when they have one, and what is missing. */
export async function describeAccount(db: Db, a: Account) {
  const m = a.membership;
  const joinRequest = m ? null : await joinRequestOf(db, a.user.id);
  const state: AccountState = !a.emailVerified
    ? 'email_unverified'
    : m
      ? m.active
        ? 'active'
        : 'deactivated'
      : joinRequest?.status === 'pending'
        ? 'awaiting_approval'
        : joinRequest?.status === 'refused'
          ? 'refused'
          : 'no_organisation';
  const role = m?.role ?? null;
  return {
    user: { ...a.user, role },
    organization: m?.organization ?? null,
    role,
    permissions: state === 'active' && role ? ROLE_PERMISSIONS[role] : [],
    email_verified: a.emailVerified,
    account_state: state,
    join_request: joinRequest,
  };
}
