/**
 * What stands in front of every route: a byte limit for the bodies better-auth reads itself,
 * the same-origin rule for state-changing /api requests, and the security headers.
 */
import type { RequestHandler, Response } from 'express';
import helmet from 'helmet';
import { HttpError } from '@/server/errors';

/** Bytes a sign-up, sign-in or account request may carry (a sign-up is well under 1 KB). */
export const AUTH_BODY_LIMIT = 64 * 1024;
/** Bytes of any other JSON body under /api (a spec with its bins is a few KB). */
export const JSON_BODY_LIMIT = 1024 * 1024;

function tooLarge(res: Response, limit: number) {
  if (res.headersSent) return;
  // Close the connection after the answer so the rest of the body is not read to keep it alive.
  res.set('Connection', 'close');
  res.status(413).json({ code: 'too_large', message: `The request body is larger than the ${limit / 1024} KB this route accepts; nothing was stored.` });
}

/**
 * Reads the body of a request meant for better-auth, counting bytes as they arrive, and stops
 * at `limit` with 413 (a declared Content-Length above it is refused before reading). The body
 * read is handed on as text in `req.body`, which better-auth's Node adapter uses when the
 * stream has been read.
 */
export function authBodyLimit(limit = AUTH_BODY_LIMIT): RequestHandler {
  return (req, res, next) => {
    if (req.method === 'GET' || req.method === 'HEAD' || req.method === 'OPTIONS') return next();
    const declared = Number(req.headers['content-length']);
    if (Number.isFinite(declared) && declared > limit) return tooLarge(res, limit);
    const chunks: Buffer[] = [];
    let size = 0;
    let over = false;
    const onData = (chunk: Buffer) => {
      size += chunk.length;
      if (size > limit) {
        over = true;
        req.off('data', onData);
        req.pause();
        tooLarge(res, limit);
        return;
      }
      chunks.push(chunk);
    };
    req.on('data', onData);
    req.once('end', () => {
      if (over) return;
      req.body = size ? Buffer.concat(chunks).toString('utf8') : undefined;
      next();
    });
    req.once('error', (err) => {
      if (!over) next(err);
    });
  };
}

const STATE_CHANGING = new Set(['POST', 'PUT', 'PATCH', 'DELETE']);

/** The origin (scheme://host:port) of a URL, or null when it is not one. */
export function originOf(url: string): string | null {
  try {
    const u = new URL(url);
    return u.origin === 'null' ? null : u.origin;
  } catch {
    return null;
  }
}

/**
 * State-changing /api requests must come from the app's own pages: the Origin header, or the
 * Referer's origin when a browser sent no Origin, must be one of `trusted`, else 403
 * `cross_origin`. A request with neither header is not a browser's cross-site request (browsers
 * send Origin with every cross-site POST, PUT, PATCH and DELETE, and "null" from sandboxed or
 * privacy-stripped contexts, which is refused): the command line, scripts and tests pass.
 */
export function sameOrigin(trusted: string[]): RequestHandler {
  const allowed = new Set(trusted.map(originOf).filter((o): o is string => !!o));
  return (req, _res, next) => {
    if (!STATE_CHANGING.has(req.method)) return next();
    const origin = req.headers.origin;
    const referer = req.headers.referer;
    if (origin === undefined && referer === undefined) return next();
    const from = origin !== undefined ? originOf(origin) : originOf(referer!);
    if (from && allowed.has(from)) return next();
    next(new HttpError(403, 'cross_origin', `This request came from ${from ?? 'an unknown page'}, not from Quasilevel's own address; it was refused. Open Quasilevel at its own address and try again.`));
  };
}

/**
 * helmet's headers with a Content-Security-Policy the exported web app runs under: scripts only
 * from the app's own files; inline styles allowed because react-native-web writes its styles into
 * <style> tags at run time; fonts and images from the app (data: and blob: for the charts'
 * images and picked files); requests only to the app itself. HSTS and the upgrade of insecure
 * requests only when the public address is https (on http they would break the app).
 */
export function securityHeaders(publicUrl: string): RequestHandler {
  const https = publicUrl.startsWith('https:');
  return helmet({
    contentSecurityPolicy: {
      useDefaults: false,
      directives: {
        'default-src': ["'self'"],
        'base-uri': ["'self'"],
        'script-src': ["'self'"],
        'script-src-attr': ["'none'"],
        'style-src': ["'self'", "'unsafe-inline'"],
        'font-src': ["'self'", 'data:'],
        'img-src': ["'self'", 'data:', 'blob:'],
        'connect-src': ["'self'", 'blob:'],
        'form-action': ["'self'"],
        'frame-ancestors': ["'none'"],
        'object-src': ["'none'"],
        ...(https ? { 'upgrade-insecure-requests': [] } : {}),
      },
    },
    strictTransportSecurity: https ? { maxAge: 180 * 24 * 3600 } : false,
    referrerPolicy: { policy: 'same-origin' },
    crossOriginEmbedderPolicy: false,
  });
}
