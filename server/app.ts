/**
 * Builds the Express app (no listen): the security headers, the same-origin rule for
 * state-changing /api requests, better-auth's handler behind a byte limit (it reads its own
 * body), then JSON, then the guarded /api routers, the JSON 404 and the one error handler, and
 * last the exported web build with an SPA fallback. Tests import this with an in-memory database.
 */
import { existsSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import zlib from 'node:zlib';
import { toNodeHandler } from 'better-auth/node';
import compression from 'compression';
import express from 'express';
import type { Express } from 'express';
import type { Db } from '@/db/client';
import type { Auth } from '@/server/auth';
import { apiNotFound, errorHandler, HttpError } from '@/server/errors';
import { authBodyLimit, JSON_BODY_LIMIT, originOf, sameOrigin, securityHeaders } from '@/server/guards';
import type { Mailer } from '@/server/mail';
import { CallerCache, guardOrganizationEndpoints, invalidatesCallers, requireAccount, requireSession } from '@/server/permissions';
import type { Account } from '@/server/permissions';
import { batchesRouter } from '@/server/routes/batches';
import { fitsRouter } from '@/server/routes/fits';
import { compareRouter } from '@/server/routes/compare';
import { curvesRouter } from '@/server/routes/curves';
import { healthRouter } from '@/server/routes/health';
import { invitationsRouter } from '@/server/routes/invitations';
import { membershipRequestsRouter } from '@/server/routes/membership-requests';
import { meRouter } from '@/server/routes/me';
import { organizationRouter } from '@/server/routes/organization';
import { physicsRouter } from '@/server/routes/physics';
import { reviewsRouter } from '@/server/routes/reviews';
import { setupsRouter } from '@/server/routes/setups';
import { specsRouter } from '@/server/routes/specs';
import { stationsRouter } from '@/server/routes/stations';
import { stringsRouter } from '@/server/routes/strings';
import { outboxRouter } from '@/server/routes/outbox';
import { batchOriginalsRouter, curveOriginalsRouter } from '@/server/routes/originals';
import { usersRouter } from '@/server/routes/users';
import type { Analyser } from '@/server/services/analysis-pool';
import type { CallerSignals } from '@/server/services/cluster-signals';
import type { ObjectStore } from '@/server/storage';
import { stationKeys } from '@/server/station-keys';
import { receiveUploads } from '@/server/upload-receiver';
import { serveWebApp } from '@/server/web-assets';
import type { UploadLimits } from '@/server/upload-receiver';

export type AppDeps = {
  db: Db;
  auth: Auth;
  mailer: Mailer;
  /** Folder of the exported web app (dist/); served when it exists. */
  webDir?: string;
  /** Where uploads are fitted: the server passes its worker pool; default in this thread. */
  analyser?: Analyser;
  /** How long a resolved caller is reused, ms (the server: 5000; default 0, every request asks the database). */
  sessionCacheMs?: number;
  /** Several server processes on one database: clears of the resolved callers are told to the others (services/cluster-signals.ts). */
  callerSignals?: Pick<CallerSignals, 'publish' | 'subscribe'>;
  /** Folder for uploads on their way in (the server: `<data>/tmp/uploads`; default a folder per process in the system's temp folder). */
  uploadDir?: string;
  /** Caps of one upload (default UPLOAD_LIMITS); tests lower them. */
  uploadLimits?: UploadLimits;
  /**
   * Origins whose pages may send state-changing /api requests (default: better-auth's trusted
   * origins and its base URL — the runtime derives both from PUBLIC_URL).
   */
  trustedOrigins?: string[];
  /** The raw-data archive (server/storage): every uploaded file is kept there. Without one, originals are not kept and their routes answer 503. */
  store?: ObjectStore | null;
};

/** better-auth's base URL and trusted origins, as given to createAuth. */
function authOrigins(auth: Auth): { base: string; trusted: string[] } {
  const o = auth.options as { baseURL?: unknown; trustedOrigins?: unknown };
  const base = typeof o.baseURL === 'string' ? o.baseURL : '';
  const trusted = Array.isArray(o.trustedOrigins) ? o.trustedOrigins.filter((x): x is string => typeof x === 'string') : [];
  return { base, trusted: [base, ...trusted].filter((x) => originOf(x)) };
}

export function createApp(deps: AppDeps): Express {
  const { db, auth } = deps;
  const app = express();
  app.disable('x-powered-by');
  app.set('trust proxy', false);
  // No ETag on API answers: nothing asks conditionally, and hashing a 4 MB comparison costs ~10 ms a request.
  app.set('etag', false);

  const origins = authOrigins(auth);
  app.use(securityHeaders(origins.base));
  app.use('/api', sameOrigin(deps.trustedOrigins ?? origins.trusted));

  // The sign-in rate limit keys on this header; only the socket's address may set it.
  app.use((req, _res, next) => {
    req.headers['x-quasilevel-client-ip'] = req.socket.remoteAddress ?? 'unknown';
    next();
  });

  // Compression: the web bundle (~3 MB raw) with the default settings (~0.7 MB); API answers,
  // made per request, with the fastest settings: a 3 MB comparison takes ~25 ms instead of ~150.
  const apiCompression = compression({ level: 1, brotli: { params: { [zlib.constants.BROTLI_PARAM_QUALITY]: 1 } } });
  const assetCompression = compression();
  app.use((req, res, next) => (req.path.startsWith('/api/') ? apiCompression : assetCompression)(req, res, next));

  // Station keys: only batch creation and uploads, everything else 403 (server/station-keys.ts).
  app.use('/api', stationKeys(auth, db));

  const callers = new CallerCache<Account>(deps.sessionCacheMs ?? 0);
  deps.callerSignals?.subscribe(() => callers.clear());
  // What clears this process's callers clears the other server processes' too.
  const clearEverywhere = {
    clear: () => {
      callers.clear();
      deps.callerSignals?.publish();
    },
  };
  const authHandler = toNodeHandler(auth);
  // Keys are made and revoked through /api/stations only (named, per organisation, admins).
  app.use('/api/auth/api-key', () => {
    throw new HttpError(403, 'forbidden', 'Station keys are managed on the Stations screen (/api/stations).');
  });
  app.use('/api/auth/organization', guardOrganizationEndpoints(auth, db, callers));
  app.all('/api/auth/{*splat}', authBodyLimit(), invalidatesCallers(clearEverywhere), (req, res) => authHandler(req, res));

  app.use('/api', express.json({ limit: JSON_BODY_LIMIT }));
  app.use('/api/health', healthRouter());

  const session = requireSession(auth, db, callers);
  // Public links in mails point at the address better-auth was configured with.
  const baseUrl = String(auth.options.baseURL ?? '').replace(/\/$/, '');
  app.use('/api/me', requireAccount(auth, db, callers), meRouter(db));
  // Membership changes clear the resolved callers, like role changes.
  app.use('/api/users', invalidatesCallers(clearEverywhere), session, usersRouter(db));
  app.use('/api/invitations', invalidatesCallers(clearEverywhere), session, invitationsRouter(db, deps.mailer, baseUrl));
  app.use('/api/membership-requests', invalidatesCallers(clearEverywhere), session, membershipRequestsRouter(db, deps.mailer, baseUrl));
  app.use('/api/organization', session, organizationRouter(db));
  app.use('/api/outbox', session, outboxRouter(db));
  const store = deps.store ?? null;
  const receiver = receiveUploads(deps.uploadDir ?? path.join(os.tmpdir(), `quasilevel-uploads-${process.pid}`), deps.uploadLimits);
  // What uploads hold in memory now (tests check it goes back to 0).
  app.locals.uploadMemory = receiver.budget;
  app.use(
    '/api/batches',
    session,
    batchesRouter(db, receiver, deps.analyser, store),
    reviewsRouter(db, deps.mailer, baseUrl),
    batchOriginalsRouter(db, store),
    fitsRouter(db, deps.analyser),
  );
  app.use('/api/specs', session, specsRouter(db));
  app.use('/api/setups', session, setupsRouter(db));
  app.use('/api/compare', session, compareRouter(db));
  app.use('/api/curves', session, curvesRouter(db, deps.analyser), curveOriginalsRouter(db, store, deps.analyser));
  app.use('/api/physics', session, physicsRouter(db));
  app.use('/api/strings', session, stringsRouter(db));
  app.use('/api/stations', session, stationsRouter(auth, db));

  app.use('/api', apiNotFound);
  app.use('/api', errorHandler);

  const webDir = deps.webDir;
  if (webDir && existsSync(path.join(webDir, 'index.html'))) {
    serveWebApp(app, webDir);
  } else {
    app.get('/', (_req, res) => {
      res.type('text').send('Quasilevel API is running. The web app is not built: run `npm run build:web`.');
    });
  }
  app.use(errorHandler);
  return app;
}
