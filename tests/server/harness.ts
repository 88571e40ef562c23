/**
 * Test harness: the real app on a fresh in-memory PGlite with the committed migrations (started
 * from a migrated template, tests/support/test-database.ts), the real better-auth, and the mail
 * module writing to a temporary outbox (the only thing faked is the mail server, by the file
 * transport the product itself uses offline).
 */
import { mkdtempSync, readdirSync, readFileSync, rmSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { and, desc, eq } from 'drizzle-orm';
import request from 'supertest';
import type { Express } from 'express';
import { mailLog, member, membershipRequest, organization, user } from '@/db/schema';
import type { Database } from '@/db/client';
import { createApp } from '@/server/app';
import { createAuth } from '@/server/auth';
import type { Auth } from '@/server/auth';
import { createMailer } from '@/server/mail';
import type { Mailer } from '@/server/mail';
import type { Role } from '@/lib/auth/roles';
import type { Analyser } from '@/server/services/analysis-pool';
import { decideRequest } from '@/server/services/membership';
import { openTestDatabase } from '@/tests/support/test-database';
import { openFakeStorage } from '@/server/storage';
import type { Storage } from '@/server/storage';

export const BASE_URL = 'http://localhost:8080';

export type Harness = {
  app: Express;
  /** The raw-data archive: an s3rver fake on a temporary folder, one per harness (tests stop it to see faults). */
  storage?: Storage;
  /** The fake's folder (a test restarts the fake there after stopping it). */
  objectsDir?: string;
  database: Database;
  auth: Auth;
  mailer: Mailer;
  outboxDir: string;
  close: () => Promise<void>;
  /** The raw .eml texts in the outbox, oldest first. */
  mails: () => string[];
};

/**
 * Registers an app that a test built itself (own upload folder, caps, session length …) so that
 * `signUp` can read its outbox and answer its join requests like a harness app's.
 */
export function adoptApp(parts: Omit<Harness, 'mails' | 'close'>): Harness {
  const h: Harness = {
    ...parts,
    mails: () =>
      readdirSync(parts.outboxDir)
        .sort()
        .map((f) => readFileSync(path.join(parts.outboxDir, f), 'utf8')),
    close: async () => {
      await parts.database.close();
      rmSync(parts.outboxDir, { recursive: true, force: true });
    },
  };
  harnesses.set(parts.app, h);
  return h;
}

/** The harness of each app, so that the sign-up helper can read the outbox and answer requests. */
const harnesses = new WeakMap<Express, Harness>();

export async function startHarness(opts: { signInPerMinute?: number; analyser?: Analyser; sessionCacheMs?: number; database?: Database } = {}): Promise<Harness> {
  // `database`: one the test opened itself (a PostgreSQL server in tests/server/postgres.test.ts).
  const database = opts.database ?? (await openTestDatabase());
  const objectsDir = mkdtempSync(path.join(os.tmpdir(), 'ql-objects-'));
  const storage = await openFakeStorage(objectsDir);
  const outboxDir = mkdtempSync(path.join(os.tmpdir(), 'ql-outbox-'));
  const mailer = createMailer({ db: database.db, outboxDir });
  const auth = createAuth({
    db: database.db,
    mailer,
    baseURL: BASE_URL,
    secret: 'test-secret-0123456789abcdef0123456789abcdef',
    trustedOrigins: [BASE_URL],
    signInPerMinute: opts.signInPerMinute ?? 0,
    logLevel: 'error',
  });
  const app = createApp({ db: database.db, auth, mailer, analyser: opts.analyser, sessionCacheMs: opts.sessionCacheMs, store: storage.store });
  const h: Harness = {
    app,
    storage,
    objectsDir,
    database,
    auth,
    mailer,
    outboxDir,
    mails: () =>
      readdirSync(outboxDir)
        .sort()
        .map((f) => readFileSync(path.join(outboxDir, f), 'utf8')),
    close: async () => {
      await opts.analyser?.close();
      await storage.stop();
      await database.close();
      rmSync(outboxDir, { recursive: true, force: true });
      rmSync(objectsDir, { recursive: true, force: true });
    },
  };
  harnesses.set(app, h);
  return h;
}

function harnessOf(app: Express): Harness {
  const h = harnesses.get(app);
  if (!h) throw new Error('this app was not made by startHarness');
  return h;
}

/** The newest mail of `kind` sent to `email` (from the mail log, whose bodies are plain text). */
export async function lastMail(app: Express, email: string, kind: string) {
  const [m] = await harnessOf(app)
    .database.db.select()
    .from(mailLog)
    .where(and(eq(mailLog.to, email.toLowerCase()), eq(mailLog.kind, kind)))
    .orderBy(desc(mailLog.createdAt))
    .limit(1);
  return m ?? null;
}

/** The path of the newest verification link mailed to `email` (what the person would click). */
export async function verificationPath(app: Express, email: string): Promise<string> {
  const m = await lastMail(app, email, 'verify-email');
  const url = m?.body.match(/https?:\/\/\S+\/api\/auth\/verify-email\?\S+/)?.[0];
  if (!url) throw new Error(`no verification link was mailed to ${email}`);
  const u = new URL(url);
  return u.pathname + u.search;
}

/** Opens the verification link of `email` with `agent` (which is then signed in); returns the redirect's target. */
export async function verifyEmail(app: Express, email: string, agent = agentFor(app)) {
  const res = await agent.get(await verificationPath(app, email));
  if (res.status !== 302) throw new Error(`verification of ${email} failed: ${res.status} ${JSON.stringify(res.body)}`);
  return { agent, location: String(res.headers.location) };
}

/** Approves the pending request of `email` to join, as the organisation's first administrator would, with `role`. */
export async function approveRequest(app: Express, email: string, role: Role = 'test_engineer') {
  const { db } = harnessOf(app).database;
  const [r] = await db
    .select({ id: membershipRequest.id, orgId: membershipRequest.organizationId })
    .from(membershipRequest)
    .innerJoin(user, eq(membershipRequest.userId, user.id))
    .where(and(eq(user.email, email.toLowerCase()), eq(membershipRequest.status, 'pending')));
  if (!r) return false;
  const [admin] = await db
    .select({ userId: user.id, name: user.name, email: user.email, organizationId: organization.id })
    .from(member)
    .innerJoin(user, eq(member.userId, user.id))
    .innerJoin(organization, eq(member.organizationId, organization.id))
    .where(and(eq(member.organizationId, r.orgId), eq(member.role, 'admin')))
    .limit(1);
  await decideRequest(db, harnessOf(app).mailer, BASE_URL, admin, r.id, { approve: true, role });
  return true;
}

/** A supertest agent that keeps cookies, with the Origin header a browser would send. */
export function agentFor(app: Express) {
  const agent = request.agent(app);
  agent.set('Origin', BASE_URL);
  return agent;
}

/**
 * A new member, the way a person becomes one: signs up, opens the verification link from the
 * outbox (which signs them in) and — when their domain's organisation exists and asks for
 * approval — has the request approved as test engineer by its administrator (`approve: false`
 * leaves it waiting). The first address of a new domain founds its organisation as administrator.
 */
export async function signUp(app: Express, who: { email: string; password?: string; name?: string }, opts: { approve?: boolean } = {}) {
  const res = await agentFor(app)
    .post('/api/auth/sign-up/email')
    .send({ email: who.email, password: who.password ?? 'correct-horse-9', name: who.name ?? who.email.split('@')[0] });
  if (res.status !== 200) throw new Error(`sign-up of ${who.email} failed: ${res.status} ${JSON.stringify(res.body)}`);
  const { agent } = await verifyEmail(app, who.email);
  if (opts.approve !== false) await approveRequest(app, who.email);
  return agent;
}

export async function signIn(app: Express, email: string, password: string) {
  const agent = agentFor(app);
  const res = await agent.post('/api/auth/sign-in/email').send({ email, password });
  if (res.status !== 200) throw new Error(`sign-in of ${email} failed: ${res.status} ${JSON.stringify(res.body)}`);
  return agent;
}
