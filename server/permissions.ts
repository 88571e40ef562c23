/**
 * Request guards. `requireSession` resolves the better-auth session and the caller's membership
 * (organisation + role) once per request; `requirePermission` checks the role table in
 * lib/auth/roles.ts. The screens hide what a role cannot use; these guards are what enforce it.
 */
import { fromNodeHeaders } from 'better-auth/node';
import { eq } from 'drizzle-orm';
import type { NextFunction, Request, RequestHandler, Response } from 'express';
import { LRUCache } from 'lru-cache';
import type { Db } from '@/db/client';
import { member, organization } from '@/db/schema';
import { can, isRole } from '@/lib/auth/roles';
import type { Permission, Role } from '@/lib/auth/roles';
import type { Auth } from '@/server/auth';
import { HttpError } from '@/server/errors';

export type Caller = {
  user: { id: string; name: string; email: string };
  sessionId: string;
  organization: { id: string; name: string; domain: string };
  memberId: string;
  role: Role;
  /** Set when a station key sent the request (server/station-keys.ts); `user` is then the station's own row. */
  station?: { id: string; name: string };
};

/**
 * A signed-in person before any membership check: the address may be unverified, the person may
 * belong to no organisation yet (a request waits) or be deactivated. /api/me answers from this.
 */
export type Account = {
  user: { id: string; name: string; email: string };
  emailVerified: boolean;
  sessionId: string;
  membership: { organization: Caller['organization']; memberId: string; role: Role; active: boolean } | null;
};

declare module 'express-serve-static-core' {
  interface Request {
    caller?: Caller;
    account?: Account;
  }
}

/** The caller of a guarded route (set by requireSession). */
export function callerOf(req: Request): Caller {
  if (!req.caller) throw new HttpError(401, 'unauthenticated', 'Sign in to use this.');
  return req.caller;
}

/** The caller as the actor of a recorded change (services/audit.ts). */
export function actorOf(req: Request): { userId: string; name: string; email: string; organizationId: string } {
  const c = callerOf(req);
  return { userId: c.user.id, name: c.user.name, email: c.user.email, organizationId: c.organization.id };
}

/** The signed-in account of a guarded route (set by requireAccount or requireSession). */
export function accountOf(req: Request): Account {
  if (!req.account) throw new HttpError(401, 'unauthenticated', 'Sign in to use this.');
  return req.account;
}

/** A resolved caller (or account) and when their session ends; null when the request has no valid session. */
export type ResolvedCaller<T = Caller> = { caller: T; sessionExpiresAt: Date } | null;
type ResolveCaller<T> = () => Promise<ResolvedCaller<T>>;
type Entry<T> = { caller: T; until: number };

/**
 * Recently resolved callers, keyed by the request's Cookie header: each guarded request would
 * otherwise cost three database round trips (session, user, membership) before any work. An
 * entry lives `ttlMs` and never past its session's expiry; requests that miss one key at the
 * same time (a screen loading several resources at once) share one resolution (lru-cache's
 * fetch). Every change made through the product (sign-in or -out, password, organisation or
 * role changes: any non-GET under /api/auth or /api/users) clears it, so a signed-out cookie is
 * refused at once; only an edit of the database behind the server's back waits out the ttl.
 */
export class CallerCache<T extends object = Caller> {
  private readonly entries: LRUCache<string, Entry<T>, ResolveCaller<T>>;

  constructor(
    readonly ttlMs: number,
    maxEntries = 5000,
  ) {
    this.entries = new LRUCache<string, Entry<T>, ResolveCaller<T>>({
      max: maxEntries,
      fetchMethod: async (_key, _stale, { context: resolve }) => {
        const found = await resolve();
        return found ? { caller: found.caller, until: Math.min(Date.now() + this.ttlMs, found.sessionExpiresAt.getTime()) } : undefined;
      },
      // A resolution under way when the cache is cleared still answers the requests waiting for
      // it (they began before the change), but is not kept.
      ignoreFetchAbort: true,
    });
  }

  get(key: string, now = Date.now()): T | null {
    const e = this.entries.get(key);
    if (!e) return null;
    if (e.until <= now) {
      this.entries.delete(key);
      return null;
    }
    return e.caller;
  }

  set(key: string, caller: T, sessionExpiresAt: Date, now = Date.now()): void {
    if (this.ttlMs <= 0) return;
    this.entries.set(key, { caller, until: Math.min(now + this.ttlMs, sessionExpiresAt.getTime()) });
  }

  /** The caller under `key`, resolving it with `resolve` when missing or expired (once for concurrent misses). */
  async resolve(key: string, resolve: ResolveCaller<T>): Promise<T | null> {
    if (this.ttlMs <= 0 || !key) return (await resolve())?.caller ?? null;
    const hit = this.get(key);
    if (hit) return hit;
    const e = await this.entries.fetch(key, { context: resolve });
    return e?.caller ?? null;
  }

  clear(): void {
    this.entries.clear();
  }

  get size(): number {
    return this.entries.size;
  }
}

/**
 * Middleware: clears `cache` before and after any request that may change sessions or roles
 * (every non-GET, and the verification link, a GET that verifies an address and signs in).
 */
export function invalidatesCallers(cache: { clear: () => void }): RequestHandler {
  return (req, res, next) => {
    if ((req.method === 'GET' || req.method === 'HEAD') && !req.path.endsWith('/verify-email')) return next();
    cache.clear();
    // After the change is committed as well: a request resolved meanwhile may have cached the old state.
    res.on('finish', () => cache.clear());
    res.on('close', () => cache.clear());
    next();
  };
}

/** The session behind a request's headers, with the person's membership; null without a valid session. */
async function resolveAccount(auth: Auth, db: Db, req: Request): Promise<ResolvedCaller<Account>> {
  const found = await auth.api.getSession({ headers: fromNodeHeaders(req.headers) });
  if (!found) return null;
  const [m] = await db
    .select({ memberId: member.id, role: member.role, deactivatedAt: member.deactivatedAt, orgId: organization.id, orgName: organization.name, domain: organization.domain })
    .from(member)
    .innerJoin(organization, eq(member.organizationId, organization.id))
    .where(eq(member.userId, found.user.id))
    .limit(1);
  return {
    caller: {
      user: { id: found.user.id, name: found.user.name, email: found.user.email },
      emailVerified: !!found.user.emailVerified,
      sessionId: found.session.id,
      membership:
        m && isRole(m.role)
          ? { organization: { id: m.orgId, name: m.orgName, domain: m.domain }, memberId: m.memberId, role: m.role, active: !m.deactivatedAt }
          : null,
    },
    sessionExpiresAt: new Date(found.session.expiresAt),
  };
}

/** Any signed-in account, verified or not, member or not (for /api/me). 401 without a session. */
export function requireAccount(auth: Auth, db: Db, cache: CallerCache<Account> = new CallerCache<Account>(0)): RequestHandler {
  return async (req: Request, _res: Response, next: NextFunction) => {
    const account = await cache.resolve(req.headers.cookie ?? '', () => resolveAccount(auth, db, req));
    if (!account) throw new HttpError(401, 'unauthenticated', 'Your session is missing or has expired. Sign in again.');
    req.account = account;
    next();
  };
}

/** The member behind an account, or the 403 that says what is missing: a verified address, a membership, or an active one. */
export function callerOfAccount(a: Account): Caller {
  if (!a.emailVerified) {
    throw new HttpError(403, 'email_unverified', `Confirm your e-mail address first: open the link we sent to ${a.user.email} (you can ask for a new one after signing in).`);
  }
  if (!a.membership) {
    throw new HttpError(403, 'no_organisation', 'Your account does not belong to an organisation yet: an administrator has to approve your request or invite you.');
  }
  if (!a.membership.active) throw new HttpError(403, 'deactivated', 'An administrator has deactivated your account in this organisation.');
  const { organization: org, memberId, role } = a.membership;
  return { user: a.user, sessionId: a.sessionId, organization: org, memberId, role };
}

/** A verified, active member of an organisation; 401 without a session, else the 403 of callerOfAccount. */
export function requireSession(auth: Auth, db: Db, cache: CallerCache<Account> = new CallerCache<Account>(0)): RequestHandler {
  const account = requireAccount(auth, db, cache);
  return async (req: Request, res: Response, next: NextFunction) => {
    // A station key already made the caller (server/station-keys.ts, only on the routes it may use).
    if (req.caller?.station) return next();
    await account(req, res, () => undefined);
    req.caller = callerOfAccount(accountOf(req));
    next();
  };
}

/**
 * better-auth's organization endpoints (/api/auth/organization/*). Every change through them
 * would skip Quasilevel's rules and the audit log (the users screen's routes under /api/users,
 * /api/invitations, /api/membership-requests make them), so writes are closed to everyone. Reads
 * such as list-members, get-full-organization, list-invitations and get-invitation show members'
 * or invitees' e-mail addresses, so they are for active administrators only; anyone else may
 * read only about themselves (list, get-active-member, get-active-member-role).
 */
export function guardOrganizationEndpoints(auth: Auth, db: Db, cache: CallerCache<Account>): RequestHandler {
  const account = requireAccount(auth, db, cache);
  const aboutSelf = new Set(['/list', '/get-active-member', '/get-active-member-role']);
  return async (req, res, next) => {
    if (req.method !== 'GET' && req.method !== 'HEAD') {
      throw new HttpError(403, 'forbidden', 'Organisation changes go through Quasilevel’s users screen, which records them.');
    }
    await account(req, res, () => undefined);
    const caller = callerOfAccount(accountOf(req));
    if (!aboutSelf.has(req.path) && !can(caller.role, 'users:manage')) {
      throw new HttpError(403, 'forbidden', `Your role (${caller.role}) may not read this: it shows members' e-mail addresses and needs users:manage.`);
    }
    next();
  };
}
/** 403 unless the caller's role grants `permission`. Use after requireSession. */
export function requirePermission(permission: Permission): RequestHandler {
  return (req, _res, next) => {
    const c = callerOf(req);
    if (!can(c.role, permission)) {
      throw new HttpError(403, 'forbidden', `Your role (${c.role}) may not do this: it needs ${permission}.`);
    }
    next();
  };
}
