/**
 * Starts a complete Quasilevel server: the data folder's lock, database (migrated), mailer,
 * auth, demo seed, HTTP on HOST:PORT. Used by server/index.ts, by `npm start` and by the
 * browser and crash tests. Start-up failures a person can fix are StartErrors with a message.
 */
import { randomBytes } from 'node:crypto';
import { existsSync, mkdirSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { createServer } from 'node:http';
import type { Server } from 'node:http';
import path from 'node:path';
import { DatabaseStartError, openConfiguredDatabase } from '@/db/client';
import type { Database } from '@/db/client';
import { checkDataDirFree, lockDataDir, StartError } from '@/server/data-lock';
import { originOf } from '@/server/guards';
import { demoCurveFiles, seedDemo } from '@/server/services/seed';
import { createApp } from '@/server/app';
import { createAuth } from '@/server/auth';
import { createMailer } from '@/server/mail';
import { serverAnalyser } from '@/server/services/analysis-pool';
import { cleanOrphans } from '@/server/services/originals-admin';
import { openStorage } from '@/server/storage';
import type { Storage } from '@/server/storage';
import type { Analyser } from '@/server/services/analysis-pool';
import { startQueue, workAnalysisJobs } from '@/server/services/analysis-jobs';
import { callerSignals } from '@/server/services/cluster-signals';
import type { CallerSignals } from '@/server/services/cluster-signals';

export type RuntimeOptions = {
  dataDir: string;
  port: number;
  /** Address to listen on (default 127.0.0.1: this machine only; 0.0.0.0 for a network, behind a TLS proxy). */
  host?: string;
  webDir?: string;
  seed?: boolean;
};

/**
 * The auth secret: BETTER_AUTH_SECRET, else (embedded database only) one generated once and kept
 * in the data folder. With DATABASE_URL every server process must sign sessions with one secret,
 * so a folder's own would make each process refuse the others' sessions: the variable is required.
 */
function authSecret(dataDir: string, shared: boolean): string {
  if (process.env.BETTER_AUTH_SECRET) return process.env.BETTER_AUTH_SECRET;
  if (shared) throw new StartError('BETTER_AUTH_SECRET is not set. With DATABASE_URL every server process must sign sessions with the same secret: set BETTER_AUTH_SECRET to one long random value (for example `openssl rand -hex 32`) for all of them.');
  const file = path.join(dataDir, 'auth-secret');
  if (existsSync(file)) return readFileSync(file, 'utf8').trim();
  const secret = randomBytes(32).toString('hex');
  writeFileSync(file, secret, { mode: 0o600 });
  return secret;
}

/** How long the server reuses a resolved session and role, ms (see CallerCache): QUASILEVEL_SESSION_CACHE_MS, default 5000. */
function sessionCacheMs(): number {
  const n = Number(process.env.QUASILEVEL_SESSION_CACHE_MS ?? 5000);
  return Number.isFinite(n) && n >= 0 ? n : 5000;
}

/**
 * Origins whose pages may change data: PUBLIC_URL's, the server's own loopback addresses on its
 * port and, only when NODE_ENV is development, the Metro dev server (`npm run dev:web`, port 8081).
 */
export function trustedOrigins(publicUrl: string, port: number, env: NodeJS.ProcessEnv = process.env): string[] {
  const dev = env.NODE_ENV === 'development' ? ['http://localhost:8081', 'http://127.0.0.1:8081'] : [];
  const all = [publicUrl, `http://localhost:${port}`, `http://127.0.0.1:${port}`, ...dev].map(originOf).filter((o): o is string => !!o);
  return [...new Set(all)];
}

/** HOST, default 127.0.0.1 (this machine only). */
export function serverHost(env: NodeJS.ProcessEnv = process.env): string {
  return env.HOST || '127.0.0.1';
}

/** A caution when the server is reachable from a network without the settings that needs. */
export function networkWarning(env: NodeJS.ProcessEnv = process.env): string | null {
  const host = serverHost(env);
  if (host === '127.0.0.1' || host === 'localhost' || host === '::1') return null;
  const missing = [!env.PUBLIC_URL && 'PUBLIC_URL (the address people open; pages from any other address cannot change data)', !env.BETTER_AUTH_SECRET && 'BETTER_AUTH_SECRET'].filter(Boolean);
  const tls = env.PUBLIC_URL?.startsWith('https:') ? '' : ' Serve it behind a TLS proxy with an https PUBLIC_URL.';
  return missing.length || tls ? `HOST=${host} serves a network.${missing.length ? ` Set ${missing.join(' and ')}.` : ''}${tls}` : null;
}

/** Listens, turning a used port into a StartError with what to do about it. */
function listen(app: ReturnType<typeof createApp> | null, port: number, host: string): Promise<Server> {
  return new Promise<Server>((resolve, reject) => {
    const s = app ? app.listen(port, host) : createServer().listen(port, host);
    s.once('listening', () => resolve(s));
    s.once('error', (err: NodeJS.ErrnoException) => {
      if (err.code === 'EADDRINUSE') reject(new StartError(`Port ${port} on ${host} is already in use (another Quasilevel server or another program). Stop it, or set PORT to a free port.`));
      else if (err.code === 'EACCES') reject(new StartError(`Port ${port} on ${host} may not be used by this user; choose a port above 1023 with PORT.`));
      else if (err.code === 'EADDRNOTAVAIL') reject(new StartError(`HOST ${host} is not an address of this machine; use 127.0.0.1, 0.0.0.0 or one of its addresses.`));
      else reject(err);
    });
  });
}

/**
 * Checks, before slow work such as building the web app, that the data folder and the port are
 * free; throws the StartError startRuntime would.
 */
export async function checkCanStart(dataDir: string, port: number, host: string): Promise<void> {
  checkDataDirFree(dataDir);
  const probe = await listen(null, port, host);
  await new Promise((r) => probe.close(r));
}

/**
 * The start-up cleanup of the archive: objects no row points to (a crash between the object and
 * its row) are removed, with a count in the log. With a shared real service (S3_URL) only objects
 * older than an hour go, so uploads of another server are spared. Storage down: a warning, and
 * uploads answer 503 until it is back.
 */
async function removeOrphanOriginals(db: Database['db'], storage: Storage): Promise<void> {
  try {
    const r = await cleanOrphans(db, storage.store, { minAgeMs: storage.fake ? 0 : 3_600_000 });
    console.log(`[quasilevel] original files: ${r.objects} object(s) in ${storage.store.where}, ${r.removed} orphan(s) no row points to removed`);
  } catch (err) {
    console.warn(`[quasilevel] original files: the orphan cleanup did not run: ${(err as Error).message}`);
  }
}

export async function startRuntime(opts: RuntimeOptions): Promise<{ server: Server; database: Database; url: string; seeded: boolean; stop: () => Promise<void> }> {
  mkdirSync(opts.dataDir, { recursive: true });
  const host = opts.host ?? '127.0.0.1';
  // Before anything opens the database: two servers on one PGlite folder would corrupt it. With
  // DATABASE_URL the folder still holds this process's uploads on their way in: one per process.
  const lock = lockDataDir(opts.dataDir, { port: opts.port });
  const undo: (() => Promise<void> | void)[] = [lock.release];
  try {
    // Uploads on their way in; anything left there is from a server that was killed.
    const uploadDir = path.join(opts.dataDir, 'tmp', 'uploads');
    rmSync(uploadDir, { recursive: true, force: true });
    mkdirSync(uploadDir, { recursive: true });
    // DATABASE_URL's PostgreSQL server when set, else PGlite in <data>/db (db/client.ts chooses).
    const database = await openConfiguredDatabase(opts.dataDir).catch((err: unknown) => {
      throw err instanceof DatabaseStartError ? new StartError(err.message) : err;
    });
    undo.unshift(() => database.close());
    const url = process.env.PUBLIC_URL || `http://localhost:${opts.port}`;
    const origins = trustedOrigins(url, opts.port);
    const mailer = createMailer({ db: database.db, outboxDir: path.join(opts.dataDir, 'outbox'), smtpUrl: process.env.SMTP_URL });
    const auth = createAuth({
      db: database.db,
      mailer,
      baseURL: url,
      secret: authSecret(opts.dataDir, database.kind === 'postgres'),
      trustedOrigins: origins,
      signInPerMinute: Number(process.env.QUASILEVEL_SIGNIN_PER_MINUTE ?? 10),
    });
    // The raw-data archive: S3_URL's service, else the local fake in <data>/objects (server/storage).
    const storage = await openStorage(opts.dataDir);
    undo.unshift(() => storage.stop());
    await removeOrphanOriginals(database.db, storage);
    const threads = serverAnalyser(demoCurveFiles());
    undo.unshift(() => threads.close());
    // PostgreSQL mode: uploads queue their fits (pg-boss); this process works jobs too unless QUASILEVEL_WORKER=0.
    let analyser: Analyser = threads;
    let signals: CallerSignals | undefined;
    if (database.kind === 'postgres') {
      // Sign-outs and role changes reach the other server processes' resolved callers.
      signals = await callerSignals(database.url!);
      undo.unshift(() => signals!.stop());
      const queue = await startQueue(database.url!);
      undo.unshift(() => queue.boss.stop({ graceful: false, wait: true }));
      analyser = { ...threads, queue } as Analyser;
      if (process.env.QUASILEVEL_WORKER !== '0') await workAnalysisJobs(database.db, queue, threads);
    }
    const seeded = opts.seed === false ? false : await seedDemo(database.db, auth);
    const app = createApp({ db: database.db, auth, mailer, webDir: opts.webDir, analyser, sessionCacheMs: sessionCacheMs(), callerSignals: signals, uploadDir, trustedOrigins: origins, store: storage.store });
    const server = await listen(app, opts.port, host);
    let stopping: Promise<void> | null = null;
    const stop = () =>
      (stopping ??= (async () => {
        await new Promise<void>((resolve) => server.close(() => resolve()));
        for (const step of undo.slice(0, -1)) await Promise.resolve(step()).catch(() => undefined);
        lock.release();
      })());
    return { server, database, url, seeded, stop };
  } catch (err) {
    for (const step of undo) await Promise.resolve(step()).catch(() => undefined);
    throw err;
  }
}
