/**
 * One error shape for every API answer: `{ code, message }` (plus `details` for validation).
 * Route handlers throw HttpError; Express 5 forwards rejected promises to `errorHandler`.
 */
import type { ErrorRequestHandler, RequestHandler } from 'express';
import { ZodError } from 'zod';
import { StorageUnavailableError } from '@/server/storage/object-store';
import { issueText } from '@/lib/schemas/field-words';

export class HttpError extends Error {
  constructor(
    readonly status: number,
    readonly code: string,
    message: string,
    readonly details?: unknown,
    /** Further top-level fields of the answer (snake_case), e.g. `newer` of a spec conflict. */
    readonly extra?: Record<string, unknown>,
  ) {
    super(message);
  }
}

/** SQLSTATE raised by the database guard of released batches (db/migrations/0006_released_batch_guard.sql). */
export const RELEASED_BATCH_SQLSTATE = 'QL409';

/** True for the database's refusal to change a released batch (Drizzle wraps the driver's error in `cause`). */
export function isReleasedBatchError(err: unknown): boolean {
  for (let e = err as { code?: unknown; cause?: unknown } | undefined, depth = 0; e && depth < 4; e = e.cause as typeof e, depth++) {
    if (e.code === RELEASED_BATCH_SQLSTATE) return true;
  }
  return false;
}

export const notFound = (what: string) => new HttpError(404, 'not_found', `${what} was not found.`);

/** JSON 404 for unknown /api routes. */
export const apiNotFound: RequestHandler = (req) => {
  throw new HttpError(404, 'no_such_route', `There is no API route ${req.method} ${req.path}.`);
};

/** The first five issues, each naming its field as the forms label it (the keys stay in `details`). */
function describeZod(err: ZodError): string {
  return err.issues
    .slice(0, 5)
    .map((i) => issueText(i))
    .join('; ');
}

/** A PostgreSQL server that is down or restarting (connection refused or lost, shutting down, too many connections). */
export function isDatabaseUnavailable(err: unknown): boolean {
  const e = (err as { cause?: unknown })?.cause ?? err;
  const code = (e as { code?: string })?.code;
  const message = (e as { message?: string })?.message ?? '';
  return (
    ['ECONNREFUSED', 'ECONNRESET', 'ETIMEDOUT', 'EPIPE', '57P01', '57P02', '57P03', '53300', '08000', '08003', '08006'].includes(code ?? '') ||
    /Connection terminated|timeout exceeded when trying to connect|Client has encountered a connection error/i.test(message)
  );
}

/** Turns anything thrown into `{ code, message }` with the right status; never a stack trace. */
export const errorHandler: ErrorRequestHandler = (err, _req, res, next) => {
  if (res.headersSent) return next(err);
  if (err instanceof HttpError) {
    res.status(err.status).json({ code: err.code, message: err.message, ...(err.details ? { details: err.details } : {}), ...err.extra });
    return;
  }
  // Object storage down or unreachable (server/storage): the request can be tried again later.
  if (err instanceof StorageUnavailableError) {
    res.status(503).json({ code: 'storage_unavailable', message: err.message });
    return;
  }
  if (isReleasedBatchError(err)) {
    res.status(409).json({ code: 'batch_released', message: 'This batch is released and read-only; nothing was changed.' });
    return;
  }
  // The engines' own input errors (lib/iv, lib/physics, lib/quality, lib/strings) name the input.
  const named = (err as Error)?.name;
  if (named === 'IvInputError' || named === 'PhysicsError' || named === 'QualityError' || named === 'StringSizingError') {
    const input = (err as { input?: string }).input;
    res.status(400).json({ code: 'invalid_input', message: (err as Error).message, ...(input ? { details: { input } } : {}) });
    return;
  }
  if (err instanceof ZodError) {
    res.status(400).json({ code: 'invalid_input', message: describeZod(err), details: err.issues });
    return;
  }
  const e = err as { type?: string; status?: number; code?: string; message?: string };
  if (e?.type === 'entity.parse.failed') {
    res.status(400).json({ code: 'malformed_json', message: 'The request body is not valid JSON.' });
    return;
  }
  if (e?.type === 'entity.too.large') {
    res.status(413).json({ code: 'too_large', message: 'The request body is larger than this route accepts.' });
    return;
  }
  if (typeof e?.status === 'number' && e.status >= 400 && e.status < 500) {
    res.status(e.status).json({ code: e.code ?? 'bad_request', message: e.message ?? 'Bad request.' });
    return;
  }
  if (isDatabaseUnavailable(err)) {
    res.status(503).set('Retry-After', '5').json({ code: 'database_unavailable', message: 'The database cannot be reached just now; nothing was changed. Try again in a moment.' });
    return;
  }
  console.error('[quasilevel] unhandled error:', err);
  res.status(500).json({ code: 'internal', message: 'Something went wrong on the server. The request was not completed.' });
};
