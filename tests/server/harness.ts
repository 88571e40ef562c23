/**
 * Test harness: the real app on a fresh in-memory PGlite with the committed migrations (started
 * from a migrated template, tests/support/test-database.ts), the real better-auth, and the mail
 * module writing to a temporary outbox (the only thing faked is the mail server, by the file
 * transport the product itself uses offline).
 */
import { mkdtempSync, readdirSync, readFileSync, rmSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import request from 'supertest';
import type { Express } from 'express';
import type { Database } from '@/db/client';
import { createApp } from '@/server/app';
import { createAuth } from '@/server/auth';
import type { Auth } from '@/server/auth';
import { createMailer } from '@/server/mail';
import type { Mailer } from '@/server/mail';
import type { Analyser } from '@/server/services/analysis-pool';
import { openTestDatabase } from '@/tests/support/test-database';

export const BASE_URL = 'http://localhost:8080';

export type Harness = {
  app: Express;
  database: Database;
  auth: Auth;
  mailer: Mailer;
  outboxDir: string;
  close: () => Promise<void>;
  /** The raw .eml texts in the outbox, oldest first. */
  mails: () => string[];
};

export async function startHarness(opts: { signInPerMinute?: number; analyser?: Analyser; sessionCacheMs?: number } = {}): Promise<Harness> {
  const database = await openTestDatabase();
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
  const app = createApp({ db: database.db, auth, mailer, analyser: opts.analyser, sessionCacheMs: opts.sessionCacheMs });
  return {
    app,
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
      await database.close();
      rmSync(outboxDir, { recursive: true, force: true });
    },
  };
}

/** A supertest agent that keeps cookies, with the Origin header a browser would send. */
export function agentFor(app: Express) {
  const agent = request.agent(app);
  agent.set('Origin', BASE_URL);
  return agent;
}

export async function signUp(app: Express, who: { email: string; password?: string; name?: string }) {
  const agent = agentFor(app);
  const res = await agent
    .post('/api/auth/sign-up/email')
    .send({ email: who.email, password: who.password ?? 'correct-horse-9', name: who.name ?? who.email.split('@')[0] });
  if (res.status !== 200) throw new Error(`sign-up of ${who.email} failed: ${res.status} ${JSON.stringify(res.body)}`);
  return agent;
}

export async function signIn(app: Express, email: string, password: string) {
  const agent = agentFor(app);
  const res = await agent.post('/api/auth/sign-in/email').send({ email, password });
  if (res.status !== 200) throw new Error(`sign-in of ${email} failed: ${res.status} ${JSON.stringify(res.body)}`);
  return agent;
}
