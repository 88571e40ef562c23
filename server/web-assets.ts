/**
 * Serving the exported web app (dist/): files whose name carries a content hash (the bundles
 * under /_expo/static/, `entry-<32 hex>.js`; fonts and images, `name.<32 hex>.ttf`) never change
 * under their name, so browsers keep them a year without asking again (`immutable`); anything
 * else a short while; the page itself (`index.html`, the SPA fallback) is asked for every time
 * (`no-cache`), so a new export reaches people on their next visit. The page gets `<link
 * rel="preload">` for the fonts the first screen waits for, so they download beside the script
 * instead of after it, and a still picture of the page (the paper background and the product's
 * name) inside the root element, which the browser paints at once and React replaces when the
 * script has run. Files the export pre-compressed (`<file>.br`, brotli at its best quality, written
 * by scripts/build-web.ts) are sent as they are to browsers that accept brotli.
 */
import { existsSync, readdirSync, readFileSync } from 'node:fs';
import path from 'node:path';
import express from 'express';
import type { Express } from 'express';

/** A file name with a 32-hex-digit content hash (Metro's md5): `entry-c60b….js`, `IBMPlexSans_400Regular.f7c4….ttf`. */
const HASHED = /[.-][0-9a-f]{32}(@\dx)?\.[a-z0-9]+$/i;

export const IMMUTABLE = 'public, max-age=31536000, immutable';

/** Fonts the first screen waits for (see app/_layout.tsx): preloaded from the page's head. */
export const PRELOADED_FONTS = ['IBMPlexSans_400Regular', 'IBMPlexSans_500Medium', 'IBMPlexSans_600SemiBold'];

const CHUNK_DIR = path.join('_expo', 'static', 'js', 'web');

/**
 * The exported page with preload links for the first screen's fonts (found under their hashed
 * names) and for the route bundles the router would otherwise fetch one after another once the
 * script has run: every layout's (`_layout-<hash>.js`, a few kB, needed on every visit) and, per
 * path, the screen's own when its name says which (`/sign-in` → `sign-in-<hash>.js`; a name that
 * several routes share, such as `index`, gets none). Measured on a cold visit to the sign-in page:
 * the four layouts came in a chain of ~45 ms after the script had run, the screen's ~10 ms after
 * the session check.
 */
export function pageWithPreloads(webDir: string): (requestPath: string) => string {
  const html = readFileSync(path.join(webDir, 'index.html'), 'utf8');
  const fontDir = path.join(webDir, 'assets', 'assets', 'fonts', 'web');
  const fonts = existsSync(fontDir) ? readdirSync(fontDir) : [];
  const fontLinks = PRELOADED_FONTS.map((name) => fonts.find((f) => f.startsWith(`${name}.`)))
    .filter((f): f is string => !!f)
    .map((f) => `<link rel="preload" href="/assets/assets/fonts/web/${f}" as="font" type="font/ttf" crossorigin>`)
    .join('');
  const chunks = existsSync(path.join(webDir, CHUNK_DIR)) ? readdirSync(path.join(webDir, CHUNK_DIR)).filter((f) => /-[0-9a-f]{32}\.js$/.test(f)) : [];
  const script = (f: string) => `<link rel="preload" href="/_expo/static/js/web/${f}" as="script">`;
  const layoutLinks = chunks.filter((f) => f.startsWith('_layout-')).map(script).join('');
  const base = html.replace('<div id="root"></div>', `<div id="root">${SPLASH}</div>`);
  const pages = new Map<string, string>();
  return (requestPath) => {
    const name = requestPath.split('/').filter(Boolean).pop() ?? '';
    const own = /^[a-z][a-z0-9-]*$/.test(name) ? chunks.filter((f) => f.startsWith(`${name}-`) && f.length === name.length + 36) : [];
    const key = own.length === 1 ? own[0] : '';
    let page = pages.get(key);
    if (page === undefined) {
      page = base.replace('</head>', `${SESSION_LINK}${fontLinks}${layoutLinks}${key ? script(key) : ''}</head>`);
      pages.set(key, page);
    }
    return page;
  };
}

/**
 * The session check every first screen starts with (lib/api/session.ts asks /api/me with the
 * cookies, `credentials: 'include'`, which is what `crossorigin="use-credentials"` matches): asked
 * for by the page's head, so the answer is there when the script wants it instead of a round trip
 * after the script has run.
 */
const SESSION_LINK = '<link rel="preload" href="/api/me" as="fetch" crossorigin="use-credentials">';

/**
 * What shows before the script runs: the sign-in page's paper, the product's name in the ink
 * colour (system font: the web fonts are not there yet). Inline style attributes, which the CSP
 * allows for styles; no script.
 */
const SPLASH =
  '<div style="flex:1;display:flex;align-items:center;justify-content:center;background:#F4F2EC;font-family:system-ui,sans-serif">' +
  '<span style="color:#111A2E;font-size:22px;font-weight:600;letter-spacing:0.3px">Quasilevel</span></div>';

const TYPES: Record<string, string> = { '.js': 'application/javascript; charset=UTF-8', '.ttf': 'font/ttf', '.css': 'text/css; charset=UTF-8' };

/** Sends `<file>.br` for a hashed file when the browser accepts brotli and the export wrote one. */
function preCompressed(webDir: string): express.RequestHandler {
  const root = path.resolve(webDir);
  return (req, res, next) => {
    if (req.method !== 'GET' && req.method !== 'HEAD') return next();
    const ext = path.extname(req.path);
    if (!TYPES[ext] || !HASHED.test(path.basename(req.path)) || !/\bbr\b/.test(String(req.headers['accept-encoding'] ?? ''))) return next();
    const file = path.resolve(root, '.' + decodeURIComponent(req.path));
    if (!file.startsWith(root + path.sep) || !existsSync(file + '.br')) return next();
    res.setHeader('Content-Type', TYPES[ext]);
    res.setHeader('Content-Encoding', 'br');
    res.setHeader('Vary', 'Accept-Encoding');
    res.setHeader('Cache-Control', IMMUTABLE);
    res.sendFile(file + '.br');
  };
}

/** Static files of the web export with their cache headers, and the page for every other path. */
export function serveWebApp(app: Express, webDir: string): void {
  const pageFor = pageWithPreloads(webDir);
  app.use(preCompressed(webDir));
  app.use(
    express.static(webDir, {
      index: false,
      setHeaders: (res, file) => {
        res.setHeader('Cache-Control', HASHED.test(path.basename(file)) ? IMMUTABLE : 'public, max-age=3600');
      },
    }),
  );
  app.get('/{*splat}', (req, res) => {
    res.setHeader('Cache-Control', 'no-cache');
    res.type('html').send(pageFor(req.path));
  });
}
