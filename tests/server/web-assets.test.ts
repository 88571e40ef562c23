/**
 * Serving the web export (server/web-assets.ts): hashed files cached for a year and immutable,
 * other files an hour, the page never without asking; the first screen's fonts preloaded from
 * the page; pre-compressed brotli files sent as they are to browsers that accept brotli, the
 * plain file to others. The export here is a folder of invented files written by the test.
 */
import { mkdirSync, mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import zlib from 'node:zlib';
import express from 'express';
import request from 'supertest';
import { IMMUTABLE, serveWebApp } from '@/server/web-assets';

const HASH = '0123456789abcdef0123456789abcdef';
let dir: string;
let app: express.Express;

beforeAll(() => {
  dir = mkdtempSync(path.join(os.tmpdir(), 'ql-web-'));
  mkdirSync(path.join(dir, '_expo', 'static', 'js', 'web'), { recursive: true });
  mkdirSync(path.join(dir, 'assets', 'assets', 'fonts', 'web'), { recursive: true });
  writeFileSync(path.join(dir, 'index.html'), '<html><head><title>t</title></head><body><div id="root"></div></body></html>');
  const js = 'console.log("entry");'.repeat(50);
  writeFileSync(path.join(dir, '_expo', 'static', 'js', 'web', `entry-${HASH}.js`), js);
  writeFileSync(path.join(dir, '_expo', 'static', 'js', 'web', `entry-${HASH}.js.br`), zlib.brotliCompressSync(js));
  for (const f of ['IBMPlexSans_400Regular', 'IBMPlexSans_500Medium', 'IBMPlexSans_600SemiBold', 'IBMPlexMono_400Regular']) {
    writeFileSync(path.join(dir, 'assets', 'assets', 'fonts', 'web', `${f}.${HASH}.ttf`), 'not a real font');
  }
  // Route bundles as the export names them: two layouts, the sign-in screen, two screens named index.
  const other = 'fedcba9876543210fedcba9876543210';
  for (const f of [`_layout-${HASH}.js`, `_layout-${other}.js`, `sign-in-${HASH}.js`, `index-${HASH}.js`, `index-${other}.js`]) {
    writeFileSync(path.join(dir, '_expo', 'static', 'js', 'web', f), '/* a route */');
  }
  writeFileSync(path.join(dir, 'favicon.ico'), 'icon');
  app = express();
  serveWebApp(app, dir);
});
afterAll(() => rmSync(dir, { recursive: true, force: true }));

it('hashed scripts and fonts: a year, immutable; the favicon an hour; the page asked for every time', async () => {
  const js = await request(app).get(`/_expo/static/js/web/entry-${HASH}.js`).set('Accept-Encoding', 'identity');
  expect(js.status).toBe(200);
  expect(js.headers['cache-control']).toBe(IMMUTABLE);
  expect(js.headers['cache-control']).toMatch(/max-age=31536000/);
  const font = await request(app).get(`/assets/assets/fonts/web/IBMPlexSans_400Regular.${HASH}.ttf`);
  expect(font.headers['cache-control']).toBe(IMMUTABLE);
  expect((await request(app).get('/favicon.ico')).headers['cache-control']).toBe('public, max-age=3600');
  const page = await request(app).get('/batches/abc');
  expect(page.status).toBe(200);
  expect(page.headers['cache-control']).toBe('no-cache');
});

it('the page preloads the three sans faces of the first screen, not the mono ones, and paints a still picture', async () => {
  const page = (await request(app).get('/sign-in')).text;
  for (const f of ['IBMPlexSans_400Regular', 'IBMPlexSans_500Medium', 'IBMPlexSans_600SemiBold']) {
    expect(page).toContain(`<link rel="preload" href="/assets/assets/fonts/web/${f}.${HASH}.ttf" as="font" type="font/ttf" crossorigin>`);
  }
  expect(page).not.toContain('IBMPlexMono');
  expect(page).toMatch(/<div id="root"><div style="[^"]*">.*Quasilevel.*<\/div><\/div>/);
  expect(page).not.toMatch(/<script>/);
});

it('the page asks for the session in its head, with the cookies, as the app’s fetch does (credentials: include)', async () => {
  for (const p of ['/sign-in', '/batches/abc']) {
    const page = (await request(app).get(p)).text;
    expect(page.match(/<link rel="preload" href="\/api\/me"[^>]*>/g)).toEqual(['<link rel="preload" href="/api/me" as="fetch" crossorigin="use-credentials">']);
  }
});

it('the page preloads every layout bundle, and the screen’s own bundle when its path names exactly one', async () => {
  const preloads = (html: string) => [...html.matchAll(/<link rel="preload" href="\/_expo\/static\/js\/web\/([^"]+)" as="script">/g)].map((m) => m[1]).sort();
  const layouts = [`_layout-${HASH}.js`, '_layout-fedcba9876543210fedcba9876543210.js'].sort();
  expect(preloads((await request(app).get('/sign-in')).text)).toEqual([...layouts, `sign-in-${HASH}.js`].sort());
  // `/` and `/batches/abc`: no bundle of that name, or two of them; the layouts only.
  expect(preloads((await request(app).get('/')).text)).toEqual(layouts);
  expect(preloads((await request(app).get('/batches/abc')).text)).toEqual(layouts);
  expect(preloads((await request(app).get('/index')).text)).toEqual(layouts);
});

it('brotli from the pre-compressed file when accepted, the plain file otherwise', async () => {
  // supertest (superagent) decodes brotli itself: the text read back is the script.
  const br = await request(app).get(`/_expo/static/js/web/entry-${HASH}.js`).set('Accept-Encoding', 'gzip, deflate, br');
  expect(br.headers['content-encoding']).toBe('br');
  expect(br.headers['content-type']).toMatch(/javascript/);
  expect(br.headers['cache-control']).toBe(IMMUTABLE);
  expect(br.text).toBe('console.log("entry");'.repeat(50));
  const plain = await request(app).get(`/_expo/static/js/web/entry-${HASH}.js`).set('Accept-Encoding', 'gzip');
  expect(plain.headers['content-encoding']).toBeUndefined();
  expect(plain.text).toBe('console.log("entry");'.repeat(50));
  // A path that climbs out of the folder is not served from the pre-compressed branch.
  expect((await request(app).get(`/_expo/../../etc/passwd-${HASH}.js`).set('Accept-Encoding', 'br')).headers['content-encoding']).toBeUndefined();
});
