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
};

declare module 'express-serve-static-core' {
  interface Request {
    caller?: Caller;
  }
}

/** The caller of a guarded route (set by requireSession). */
export function callerOf(req: Request): Caller {
  if (!req.caller) throw new HttpError(401, 'unauthenticated', 'Sign in to use this.');
  return req.caller;
}

/** A resolved caller and when their session ends; null when the request has no valid session. */
export type ResolvedCaller = { caller: Caller; sessionExpiresAt: Date } | null;
type ResolveCaller = () => Promise<ResolvedCaller>;
type Entry = { caller: Caller; until: number };

/**
 * Recently resolved callers, keyed by the request's Cookie header: each guarded request would
 * otherwise cost three database round trips (session, user, membership) before any work. An
 * entry lives `ttlMs` and never past its session's expiry; requests that miss one key at the
 * same time (a screen loading several resources at once) share one resolution (lru-cache's
 * fetch). Every change made through the product (sign-in or -out, password, organisation or
 * role changes: any non-GET under /api/auth or /api/users) clears it, so a signed-out cookie is
 * refused at once; only an edit of the database behind the server's back waits out the ttl.
 */
export class CallerCache {
  private readonly entries: LRUCache<string, Entry, ResolveCaller>;

  constructor(
    readonly ttlMs: number,
    maxEntries = 5000,
  ) {
    this.entries = new LRUCache<string, Entry, ResolveCaller>({
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

  get(key: string, now = Date.now()): Caller | null {
    const e = this.entries.get(key);
    if (!e) return null;
    if (e.until <= now) {
      this.entries.delete(key);
      return null;
    }
    return e.caller;
  }

  set(key: string, caller: Caller, sessionExpiresAt: Date, now = Date.now()): void {
    if (this.ttlMs <= 0) return;
    this.entries.set(key, { caller, until: Math.min(now + this.ttlMs, sessionExpiresAt.getTime()) });
  }

  /** The caller under `key`, resolving it with `resolve` when missing or expired (once for concurrent misses). */
  async resolve(key: string, resolve: ResolveCaller): Promise<Caller | null> {
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

/** Middleware: clears `cache` before and after any request that may change sessions or roles. */
export function invalidatesCallers(cache: CallerCache): RequestHandler {
  return (req, res, next) => {
    if (req.method === 'GET' || req.method === 'HEAD') return next();
    cache.clear();
    // After the change is committed as well: a request resolved meanwhile may have cached the old state.
    res.on('finish', () => cache.clear());
    res.on('close', () => cache.clear());
    next();
  };
}

/** The session behind a request's headers, with the caller's membership; null without a valid session, 403 without an organisation. */
async function resolveCaller(auth: Auth, db: Db, req: Request): Promise<ResolvedCaller> {
  const found = await auth.api.getSession({ headers: fromNodeHeaders(req.headers) });
  if (!found) return null;
  const [m] = await db
    .select({ memberId: member.id, role: member.role, orgId: organization.id, orgName: organization.name, domain: organization.domain })
    .from(member)
    .innerJoin(organization, eq(member.organizationId, organization.id))
    .where(eq(member.userId, found.user.id))
    .limit(1);
  if (!m || !isRole(m.role)) {
    throw new HttpError(403, 'no_organisation', 'Your account does not belong to an organisation yet. Ask an administrator.');
  }
  return {
    caller: {
      user: { id: found.user.id, name: found.user.name, email: found.user.email },
      sessionId: found.session.id,
      organization: { id: m.orgId, name: m.orgName, domain: m.domain },
      memberId: m.memberId,
      role: m.role,
    },
    sessionExpiresAt: new Date(found.session.expiresAt),
  };
}

export function requireSession(auth: Auth, db: Db, cache: CallerCache = new CallerCache(0)): RequestHandler {
  return async (req: Request, _res: Response, next: NextFunction) => {
    const caller = await cache.resolve(req.headers.cookie ?? '', () => resolveCaller(auth, db, req));
    if (!caller) throw new HttpError(401, 'unauthenticated', 'Your session is missing or has expired. Sign in again.');
    req.caller = caller;
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
