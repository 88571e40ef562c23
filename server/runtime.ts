/**
 * Starts a complete Quasilevel server: database (migrated), mailer, auth, demo seed, HTTP.
 * Used by server/index.ts, by `npm start` and by the browser and crash tests.
 */
import { randomBytes } from 'node:crypto';
import { existsSync, mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import type { Server } from 'node:http';
import path from 'node:path';
import { openDatabase } from '@/db/client';
import type { Database } from '@/db/client';
import { demoCurveFiles, seedDemo } from '@/server/services/seed';
import { createApp } from '@/server/app';
import { createAuth } from '@/server/auth';
import { createMailer } from '@/server/mail';
import { serverAnalyser } from '@/server/services/analysis-pool';

export type RuntimeOptions = {
  dataDir: string;
  port: number;
  host?: string;
  webDir?: string;
  seed?: boolean;
};

/** The auth secret: BETTER_AUTH_SECRET, else one generated once and kept in the data folder. */
function authSecret(dataDir: string): string {
  if (process.env.BETTER_AUTH_SECRET) return process.env.BETTER_AUTH_SECRET;
  const file = path.join(dataDir, 'auth-secret');
  if (existsSync(file)) return readFileSync(file, 'utf8').trim();
  const secret = randomBytes(32).toString('hex');
  writeFileSync(file, secret, { mode: 0o600 });
  return secret;
}

/** How long the server reuses a resolved session and role (see CallerCache). */
const SESSION_CACHE_MS = 5000;

export async function startRuntime(opts: RuntimeOptions): Promise<{ server: Server; database: Database; url: string; seeded: boolean; stop: () => Promise<void> }> {
  mkdirSync(opts.dataDir, { recursive: true });
  const database = await openDatabase(path.join(opts.dataDir, 'db'));
  const url = process.env.PUBLIC_URL || `http://localhost:${opts.port}`;
  const mailer = createMailer({ db: database.db, outboxDir: path.join(opts.dataDir, 'outbox'), smtpUrl: process.env.SMTP_URL });
  const auth = createAuth({
    db: database.db,
    mailer,
    baseURL: url,
    secret: authSecret(opts.dataDir),
    trustedOrigins: [url, `http://127.0.0.1:${opts.port}`, 'http://localhost:8081'],
    signInPerMinute: Number(process.env.QUASILEVEL_SIGNIN_PER_MINUTE ?? 10),
  });
  const analyser = serverAnalyser(demoCurveFiles());
  const seeded = opts.seed === false ? false : await seedDemo(database.db, auth);
  const app = createApp({ db: database.db, auth, mailer, webDir: opts.webDir, analyser, sessionCacheMs: SESSION_CACHE_MS });
  const server = await new Promise<Server>((resolve) => {
    const s = app.listen(opts.port, opts.host ?? '0.0.0.0', () => resolve(s));
  });
  let stopping: Promise<void> | null = null;
  const stop = () =>
    (stopping ??= (async () => {
      await new Promise<void>((resolve) => server.close(() => resolve()));
      await analyser.close();
      await database.close();
    })());
  return { server, database, url, seeded, stop };
}
