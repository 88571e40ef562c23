/**
 * Security checks not covered elsewhere (issue 8, item 2). Already tested and not repeated here:
 * the sign-in limit and forged client-address headers (rate-limit.test.ts), httpOnly + SameSite
 * cookies and an expired session row (auth.test.ts), another organisation's records (access-matrix).
 * Added: what the limit does to the right password and to other endpoints and when it lifts;
 * a session's lifetime and its real expiry and revocation; the Secure cookie behind https;
 * better-auth's organisation endpoints not bypassing the role table; uploads written only into
 * their folder under random names; the pass/fail CSV formula-safe in every text column. Issue
 * "Trust": body limits (auth included), stored strings, dates and numbers, the same-origin rule
 * and the security headers. Upload caps and bad parts: upload-receiving.test.ts.
 */
import fs from 'node:fs';
import http from 'node:http';
import { createRequire } from 'node:module';
import type { AddressInfo } from 'node:net';
import os from 'node:os';
import path from 'node:path';
import { eq } from 'drizzle-orm';
import Papa from 'papaparse';
import request from 'supertest';
import { dataDir } from '@/db/client';
import type { Database } from '@/db/client';
import { curve, member, organization, session, user } from '@/db/schema';
import { simulateCurve } from '@/lib/iv';
import { createApp } from '@/server/app';
import { UPLOAD_LIMITS } from '@/server/upload-receiver';
import type { UploadLimits } from '@/server/upload-receiver';
import { createAuth } from '@/server/auth';
import { createMailer } from '@/server/mail';
import { adoptApp, agentFor, BASE_URL, signIn, signUp, startHarness } from '@/tests/server/harness';
import type { Harness } from '@/tests/server/harness';
import { checkExport } from '@/tests/support/export-checks';
import { openTestDatabase } from '@/tests/support/test-database';

/** The benchmark cell simulated from its published optimum (tests/fixtures/reference-data/README.md). */
const cellRows = (() => {
  const c = simulateCurve({ iph_a: 0.760788, i0_a: 3.1068e-7, n: 1.47727, rs_ohm: 0.036547, rsh_ohm: 52.89 }, { cells: 1, temp_c: 33, points: 30 });
  return ['V,I', ...c.voltage_v.map((v, k) => `${v},${c.current_a[k]}`)].join('\n');
})();
const cellFile = (header = '') => Buffer.from(header + cellRows);

/** An app like the harness's, with the auth settings the harness does not expose. */
async function customApp(opts: { baseURL: string; sessionSeconds?: number; uploadLimits?: UploadLimits }) {
  const database: Database = await openTestDatabase();
  const outboxDir = fs.mkdtempSync(path.join(os.tmpdir(), 'ql-sec-outbox-'));
  const mailer = createMailer({ db: database.db, outboxDir });
  const auth = createAuth({
    db: database.db,
    mailer,
    baseURL: opts.baseURL,
    secret: 'test-secret-0123456789abcdef0123456789abcdef',
    trustedOrigins: [opts.baseURL],
    signInPerMinute: 0,
    sessionSeconds: opts.sessionSeconds,
    logLevel: 'error',
  });
  const uploadDir = fs.mkdtempSync(path.join(os.tmpdir(), 'ql-sec-uploads-'));
  const app = createApp({ db: database.db, auth, mailer, uploadDir, uploadLimits: opts.uploadLimits });
  adoptApp({ app, database, auth, mailer, outboxDir });
  return {
    app,
    database,
    uploadDir,
    agent: () => request.agent(app).set('Origin', opts.baseURL),
    close: async () => {
      await database.close();
      fs.rmSync(outboxDir, { recursive: true, force: true });
      fs.rmSync(uploadDir, { recursive: true, force: true });
    },
  };
}

const setCookies = (res: { headers: Record<string, unknown> }) => ([] as string[]).concat((res.headers['set-cookie'] as string[] | undefined) ?? []);
/** The `name=value` part of the session cookie a response sets. */
const sessionPair = (res: { headers: Record<string, unknown> }) => setCookies(res).find((c) => c.includes('session_token'))?.split(';')[0];

/** One harness for the checks that need no special auth settings (each uses its own organisation). */
let h: Harness;
beforeAll(async () => {
  h = await startHarness();
});
afterAll(async () => {
  await h.close();
});

describe('sign-in rate limit (3 per minute in this harness)', () => {
  let limited: Harness;
  const realNow = Date.now;
  beforeAll(async () => {
    limited = await startHarness({ signInPerMinute: 3 });
    await signUp(limited.app, { email: 'victim@limit-pv.example', password: 'the-real-password-1' });
  });
  afterAll(async () => {
    Date.now = realNow;
    await limited.close();
  });

  it('once the limit is reached even the right password is refused, with 429, a message, a retry time and no cookie; other endpoints still answer; a minute later sign-in works again', async () => {
    const attempt = (password: string) => agentFor(limited.app).post('/api/auth/sign-in/email').send({ email: 'victim@limit-pv.example', password });
    for (let k = 0; k < 3; k++) expect((await attempt(`wrong-guess-${k}-x`)).status).toBe(401);
    const blocked = await attempt('the-real-password-1');
    expect(blocked.status).toBe(429);
    expect(blocked.body.message).toMatch(/too many requests/i);
    const retry = Number(blocked.headers['x-retry-after']);
    // The window is 60 s (server/auth.ts customRules) and the last counted attempt was just now.
    expect(retry).toBeGreaterThan(0);
    expect(retry).toBeLessThanOrEqual(60);
    expect(setCookies(blocked).some((c) => c.includes('session_token'))).toBe(false);

    expect((await agentFor(limited.app).get('/api/auth/get-session')).status).toBe(200);
    expect((await agentFor(limited.app).get('/api/health')).status).toBe(200);

    // 61 s later by the limiter's clock (Date.now; better-auth's memory store reads nothing else).
    const later = realNow() + 61_000;
    Date.now = () => later;
    const after = await attempt('the-real-password-1');
    Date.now = realNow;
    expect(after.status).toBe(200);
    expect(setCookies(after).some((c) => c.includes('session_token'))).toBe(true);
  });
});

describe('sessions', () => {
  beforeAll(async () => {
    await signUp(h.app, { email: 'owner@session-pv.example', password: 'session-password-1' });
  });

  it('last 12 hours: the row expires 43,200 s after it is made and the cookie says the same', async () => {
    const res = await agentFor(h.app).post('/api/auth/sign-in/email').send({ email: 'owner@session-pv.example', password: 'session-password-1' });
    expect(res.status).toBe(200);
    const cookie = setCookies(res).find((c) => c.includes('session_token'))!;
    // 60·60·12 = 43,200 s: server/auth.ts session.expiresIn.
    expect(cookie).toMatch(/Max-Age=43200\b/);
    const [u] = await h.database.db.select().from(user).where(eq(user.email, 'owner@session-pv.example'));
    const rows = await h.database.db.select().from(session).where(eq(session.userId, u.id));
    const newest = rows.sort((a, b) => b.createdAt.getTime() - a.createdAt.getTime())[0];
    const lifetime_s = (newest.expiresAt.getTime() - newest.createdAt.getTime()) / 1000;
    expect(Math.abs(lifetime_s - 43_200)).toBeLessThan(5);
  });

  it('sign-out revokes the session on the server: the same cookie replayed afterwards gets 401', async () => {
    const res = await agentFor(h.app).post('/api/auth/sign-in/email').send({ email: 'owner@session-pv.example', password: 'session-password-1' });
    const jar = sessionPair(res)!;
    expect((await request(h.app).get('/api/me').set('Cookie', jar)).status).toBe(200);
    expect((await agentFor(h.app).post('/api/auth/sign-out').set('Cookie', jar).send({})).status).toBe(200);
    const replay = await request(h.app).get('/api/me').set('Cookie', jar);
    expect(replay.status).toBe(401);
    expect(replay.body.code).toBe('unauthenticated');
  });

});

describe('behind https, with a 2 s session lifetime', () => {
  let app: Awaited<ReturnType<typeof customApp>>;
  let cookie: string;
  beforeAll(async () => {
    app = await customApp({ baseURL: 'https://quasilevel.example', sessionSeconds: 2 });
    expect((await app.agent().post('/api/auth/sign-up/email').send({ email: 'tls@secure-pv.example', password: 'secure-password-1', name: 'TLS' })).status).toBe(200);
    // Sign-up sets no session (the verification link does); signing in before verifying does, and /api/me answers it.
    const res = await app.agent().post('/api/auth/sign-in/email').send({ email: 'tls@secure-pv.example', password: 'secure-password-1' });
    expect(res.status).toBe(200);
    cookie = setCookies(res).find((c) => c.includes('session_token'))!;
  });
  afterAll(async () => {
    await app.close();
  });

  it('the session cookie is Secure (with the __Secure- prefix), httpOnly and SameSite=Lax', () => {
    expect(cookie).toMatch(/^__Secure-/);
    expect(cookie).toMatch(/;\s*Secure/i);
    expect(cookie).toMatch(/HttpOnly/i);
    expect(cookie).toMatch(/SameSite=Lax/i);
    expect(cookie).toMatch(/Path=\//);
    expect(cookie).toMatch(/Max-Age=2\b/);
  });

  it('the session stops working by itself after its lifetime, without touching the database', async () => {
    const pair = cookie.split(';')[0];
    expect((await request(app.app).get('/api/me').set('Cookie', pair)).status).toBe(200);
    await new Promise((r) => setTimeout(r, 2_600));
    const res = await request(app.app).get('/api/me').set('Cookie', pair);
    expect(res.status).toBe(401);
    expect(res.body.code).toBe('unauthenticated');
  });
});

describe('better-auth’s own organisation endpoints do not get round the role table', () => {
  let tester: Awaited<ReturnType<typeof signUp>>;
  let outsider: Awaited<ReturnType<typeof signUp>>;
  let orgId: string;
  let testerMemberId: string;
  beforeAll(async () => {
    await signUp(h.app, { email: 'admin@org-pv.example' });
    tester = await signUp(h.app, { email: 'tester@org-pv.example' });
    outsider = await signUp(h.app, { email: 'admin@elsewhere-pv.example' });
    [{ id: orgId }] = await h.database.db.select({ id: organization.id }).from(organization).where(eq(organization.domain, 'org-pv.example'));
    const [u] = await h.database.db.select().from(user).where(eq(user.email, 'tester@org-pv.example'));
    [{ id: testerMemberId }] = await h.database.db.select({ id: member.id }).from(member).where(eq(member.userId, u.id));
  });

  // Writes to the organisation endpoints are closed to everyone (403, server/permissions.ts:
  // guardOrganizationEndpoints); 400 is better-auth's own answer (e-mail cannot be changed).
  it.each([
    ['a test engineer makes themselves admin', 403, 'tester', '/api/auth/organization/update-member-role', () => ({ memberId: testerMemberId, role: 'admin', organizationId: orgId })],
    ['a test engineer invites an admin', 403, 'tester', '/api/auth/organization/invite-member', () => ({ email: 'friend@org-pv.example', role: 'admin', organizationId: orgId })],
    ['a test engineer founds an organisation', 403, 'tester', '/api/auth/organization/create', () => ({ name: 'Mine', slug: 'mine', domain: 'mine.example' })],
    ['a test engineer renames the organisation', 403, 'tester', '/api/auth/organization/update', () => ({ data: { name: 'renamed' }, organizationId: orgId })],
    ['a test engineer deletes the organisation', 403, 'tester', '/api/auth/organization/delete', () => ({ organizationId: orgId })],
    ['an admin elsewhere promotes our test engineer', 403, 'outsider', '/api/auth/organization/update-member-role', () => ({ memberId: testerMemberId, role: 'admin', organizationId: orgId })],
    ['a test engineer changes their e-mail to another domain', 400, 'tester', '/api/auth/update-user', () => ({ email: 'tester@elsewhere-pv.example' })],
  ] as const)('%s → %i, nothing changes', async (_name, status, who, url, body) => {
    const res = await (who === 'tester' ? tester : outsider).post(url).send(body());
    expect(res.status).toBe(status);
    const [m] = await h.database.db.select().from(member).where(eq(member.id, testerMemberId));
    expect(m.role).toBe('test_engineer');
    const orgs = await h.database.db.select().from(organization);
    expect(orgs.map((o) => o.name).filter((n) => /org-pv|elsewhere-pv|mine/i.test(n)).sort()).toEqual(['elsewhere-pv.example', 'org-pv.example']);
    const [ours] = orgs.filter((o) => o.id === orgId);
    expect(ours.name).toBe('org-pv.example');
    const [u] = await h.database.db.select().from(user).where(eq(user.id, m.userId));
    expect(u.email).toBe('tester@org-pv.example');
  });
});

describe('uploads write only into the upload folder, under names of their own', () => {
  let tester: Awaited<ReturnType<typeof signUp>>;
  let batchId: string;
  let app: Awaited<ReturnType<typeof customApp>>;
  beforeAll(async () => {
    // Every file to disk (small files are otherwise held in memory and never written).
    app = await customApp({ baseURL: BASE_URL, uploadLimits: { ...UPLOAD_LIMITS, memoryBytes: 0 } });
    // Verified and let in through the harness's helper (sign-up alone gives no session).
    await signUp(app.app, { email: 'admin@files-pv.example' });
    tester = await signUp(app.app, { email: 'tester@files-pv.example' });
    batchId = (await tester.post('/api/batches').send({ name: 'Path names', cells: 1 })).body.id;
  });
  afterAll(async () => {
    jest.restoreAllMocks();
    await app.close();
  });

  it('files named with ../, absolute and Windows paths are written only into the upload folder under random names, stored with their bare names, and the folder is empty afterwards', async () => {
    const tag = `ql-escape-${process.pid}-${Date.now()}`;
    const names = [`../../${tag}-a.csv`, `/tmp/${tag}-b.csv`, `..\\..\\${tag}-c.csv`, `sub/dir/${tag}-d.csv`, `${os.tmpdir()}/../${tag}-e.csv`];
    const spy = jest.spyOn(fs, 'createWriteStream');
    // The `fs` the upload storage loads is the very object spied on here (core modules are shared).
    expect(createRequire(require.resolve('@/server/upload-storage'))('fs')).toBe(fs);
    let req = tester.post(`/api/batches/${batchId}/curves`).field('on_duplicate', 'keep');
    for (const n of names) req = req.attach('files', cellFile(), n);
    const res = await req;
    const written = spy.mock.calls.map((c) => String(c[0]));
    spy.mockRestore();

    expect(res.status).toBe(201);
    expect(written).toHaveLength(names.length);
    for (const w of written) {
      expect(path.dirname(w)).toBe(app.uploadDir);
      // Each file is named with 16 random bytes in hex, nothing of the sent name (server/upload-storage.ts).
      expect(path.basename(w)).toMatch(/^[0-9a-f]{32}$/);
    }
    const results = res.body.results as { file: string; accepted: boolean; curve_id: string; device_id: string }[];
    expect(results.map((r) => r.accepted)).toEqual(names.map(() => true));
    for (const [k, r] of results.entries()) {
      const [row] = await app.database.db.select({ fileName: curve.fileName, deviceId: curve.deviceId }).from(curve).where(eq(curve.id, r.curve_id));
      // The multipart reader keeps only the last path segment; the id is that name without its extension.
      expect(row.fileName).toBe(`${tag}-${'abcde'[k]}.csv`);
      expect(row.deviceId).toBe(`${tag}-${'abcde'[k]}`);
    }
    expect(fs.readdirSync(app.uploadDir)).toEqual([]);
    // repository-check: outside on purpose: the upload names above climb out of the working folder, so look there too.
    const places = [process.cwd(), path.resolve(process.cwd(), '..'), path.resolve(process.cwd(), '../..'), dataDir(), os.tmpdir(), '/tmp', '/'];
    for (const dir of places) {
      const listing = fs.existsSync(dir) ? fs.readdirSync(dir) : [];
      expect(listing.filter((f) => f.includes(tag))).toEqual([]);
    }
  });
});

describe('body limits', () => {
  it('a 100 MB display name on sign-up → 413 {code, message} before the body is read, and no user is stored', async () => {
    const name = 'n'.repeat(100 * 1024 * 1024);
    const res = await agentFor(h.app).post('/api/auth/sign-up/email').set('Content-Type', 'application/json').send(JSON.stringify({ email: 'huge@limits-pv.example', password: 'correct-horse-9', name }));
    expect(res.status).toBe(413);
    expect(res.body).toEqual({ code: 'too_large', message: expect.stringMatching(/larger than the 64 KB/) });
    expect(await h.database.db.select().from(user).where(eq(user.email, 'huge@limits-pv.example'))).toEqual([]);
  });

  it('a 100 KB body sent in chunks without a Content-Length is stopped at the limit too', async () => {
    const res = await new Promise<{ status: number; body: string }>((resolve, reject) => {
      const server = h.app.listen(0, '127.0.0.1', () => {
        const { port } = server.address() as AddressInfo;
        const req = http.request({ port, host: '127.0.0.1', method: 'POST', path: '/api/auth/sign-up/email', headers: { 'Content-Type': 'application/json', 'Transfer-Encoding': 'chunked', Origin: BASE_URL } }, (r) => {
          let body = '';
          r.on('data', (d) => (body += d));
          r.on('end', () => {
            server.close();
            resolve({ status: r.statusCode!, body });
          });
        });
        req.on('error', () => undefined);
        req.write(`{"email":"chunked@limits-pv.example","password":"correct-horse-9","name":"${'c'.repeat(100 * 1024)}`);
        req.end('"}');
      });
      server.on('error', reject);
    });
    expect(res.status).toBe(413);
    expect(JSON.parse(res.body).code).toBe('too_large');
    expect(await h.database.db.select().from(user).where(eq(user.email, 'chunked@limits-pv.example'))).toEqual([]);
  });

  it('a JSON body over 1 MB on another route → 413', async () => {
    const tester = await signUp(h.app, { email: 'admin@json-limit-pv.example' });
    const res = await tester.post('/api/batches').send({ name: 'big', description: 'd'.repeat(1_100_000) });
    expect(res.status).toBe(413);
    expect(res.body.code).toBe('too_large');
  });
});

describe('stored strings, dates and numbers', () => {
  let admin: Awaited<ReturnType<typeof signUp>>;
  let tester: Awaited<ReturnType<typeof signUp>>;
  let batchId: string;
  beforeAll(async () => {
    admin = await signUp(h.app, { email: 'admin@strings-pv.example' });
    tester = await signUp(h.app, { email: 'tester@strings-pv.example' });
    batchId = (await tester.post('/api/batches').send({ name: 'Strings', cells: 1 })).body.id;
  });

  it.each([
    ['a display name of 121 characters on sign-up', () => agentFor(h.app).post('/api/auth/sign-up/email').send({ email: 'long@names-pv.example', password: 'correct-horse-9', name: 'x'.repeat(121) }), /Name is longer than 120 characters/],
    ['a NUL in the display name on sign-up', () => agentFor(h.app).post('/api/auth/sign-up/email').send({ email: 'nul@names-pv.example', password: 'correct-horse-9', name: 'a\u0000b' }), /Name contains a zero character/],
    ['an escape character in the display name on update-user', () => admin.post('/api/auth/update-user').send({ name: 'Ada\u001b[2J' }), /Name contains a control character/],
  ] as const)('%s → 400 naming the field, nothing stored', async (_what, send, message) => {
    const res = await send();
    expect(res.status).toBe(400);
    expect(res.body.message).toMatch(message);
    expect(await h.database.db.select({ id: user.id }).from(user).where(eq(user.email, 'long@names-pv.example'))).toEqual([]);
    expect(await h.database.db.select({ id: user.id }).from(user).where(eq(user.email, 'nul@names-pv.example'))).toEqual([]);
    const [a] = await h.database.db.select({ name: user.name }).from(user).where(eq(user.email, 'admin@strings-pv.example'));
    expect(a.name).toBe('admin');
  });

  it.each<[string, Record<string, unknown>, RegExp]>([
    ['a NUL in the batch name', { name: 'lot\u00007' }, /^Name contains a zero character/],
    ['a bell character in the supplier', { name: 'ok', supplier: 'ACME\u0007' }, /^Supplier contains a control character/],
    ['a description of 2,001 characters', { name: 'ok', description: 'd'.repeat(2001) }, /^Description is longer than 2000 characters/],
    ['30 February', { name: 'ok', batch_date: '2026-02-30' }, /^Batch date 2026-02-30 is not a date in the calendar/],
    ['month 13', { name: 'ok', batch_date: '2026-13-01' }, /^Batch date 2026-13-01 is not a date in the calendar/],
    ['a hexadecimal cell count', { name: 'ok', cells: '0x3c' }, /^Cells in series must be a whole number/],
    ['Infinity as an area', { name: 'ok', area_cm2: 'Infinity' }, /^Area \(cm²\) must be a number/],
  ])('%s → 400 naming the field', async (_what, body, message) => {
    const res = await tester.post('/api/batches').send(body);
    expect(res.status).toBe(400);
    expect(res.body.code).toBe('invalid_input');
    // The message names the field as the form labels it; the key is in details.
    expect(res.body.message).toMatch(message);
    expect(res.body.details[0].path).toEqual([Object.keys(body).find((k) => k !== 'name') ?? 'name']);
  });

  it('multi-line descriptions and comments keep their line breaks; 29 February of a leap year is a date', async () => {
    const res = await tester.patch(`/api/batches/${batchId}`).send({ description: 'line one\nline two\r\n\tindented', batch_date: '2028-02-29' });
    expect(res.status).toBe(200);
    expect(res.body.description).toBe('line one\nline two\r\n\tindented');
  });

  it('a spec name with a control character → 400 naming it', async () => {
    const [t] = await h.database.db.select().from(user).where(eq(user.email, 'tester@strings-pv.example'));
    await h.database.db.update(member).set({ role: 'qa_lead' }).where(eq(member.userId, t.id));
    const res = await tester.post('/api/specs').send({ name: 'Spec\u0000', limits: { pmp_w: { min: 0 } } });
    expect(res.status).toBe(400);
    expect(res.body.message).toMatch(/name contains a control character/);
  });
});

describe('cross-site requests', () => {
  let tester: Awaited<ReturnType<typeof signUp>>;
  let cookie: string;
  beforeAll(async () => {
    await signUp(h.app, { email: 'admin@origin-pv.example' });
    tester = await signUp(h.app, { email: 'tester@origin-pv.example' });
    // A bare session cookie (no agent), so each case sets exactly the headers it names.
    const res = await agentFor(h.app).post('/api/auth/sign-in/email').send({ email: 'tester@origin-pv.example', password: 'correct-horse-9' });
    cookie = sessionPair(res)!;
  });

  it.each<[string, number, Record<string, string>]>([
    ['a foreign Origin', 403, { Origin: 'https://evil.example' }],
    ['Origin "null" (a sandboxed page)', 403, { Origin: 'null' }],
    ['the app’s host on another port', 403, { Origin: 'http://localhost:8081' }],
    ['no Origin and a foreign Referer', 403, { Referer: 'https://evil.example/page' }],
    ['no Origin and the app’s own Referer', 201, { Referer: `${BASE_URL}/batches` }],
    ['the app’s own Origin', 201, { Origin: BASE_URL }],
    ['neither header (the command line, scripts)', 201, {}],
  ])('a POST with %s and a valid session cookie → %i', async (_what, status, headers) => {
    const res = await request(h.app).post('/api/batches').set('Cookie', cookie).set(headers).send({ name: 'Cross-site' });
    expect(res.status).toBe(status);
    if (status === 403) expect(res.body).toEqual({ code: 'cross_origin', message: expect.stringMatching(/refused/) });
  });

  it('auth routes too: a sign-out or sign-up from a foreign page is refused and changes nothing', async () => {
    const out = await request(h.app).post('/api/auth/sign-out').set('Cookie', cookie).set('Origin', 'https://evil.example').send({});
    expect(out.status).toBe(403);
    expect(out.body.code).toBe('cross_origin');
    expect((await request(h.app).get('/api/me').set('Cookie', cookie)).status).toBe(200);
    const up = await request(h.app).post('/api/auth/sign-up/email').set('Origin', 'https://evil.example').send({ email: 'x@evil-pv.example', password: 'correct-horse-9', name: 'X' });
    expect(up.status).toBe(403);
    expect(await h.database.db.select().from(user).where(eq(user.email, 'x@evil-pv.example'))).toEqual([]);
  });

  it('DELETE and PATCH are checked, GET is not', async () => {
    const b = (await tester.post('/api/batches').send({ name: 'Patch me' })).body;
    expect((await request(h.app).patch(`/api/batches/${b.id}`).set('Cookie', cookie).set('Origin', 'https://evil.example').send({ name: 'pwned' })).status).toBe(403);
    expect((await request(h.app).get(`/api/batches/${b.id}`).set('Cookie', cookie).set('Origin', 'https://evil.example')).status).toBe(200);
    expect((await tester.get(`/api/batches/${b.id}`)).body.name).toBe('Patch me');
  });
});

describe('security headers', () => {
  it('the page and the API carry a Content-Security-Policy, nosniff, frame and referrer rules; no HSTS on http', async () => {
    for (const url of ['/', '/api/health']) {
      const res = await request(h.app).get(url);
      const csp = String(res.headers['content-security-policy']);
      expect(csp).toMatch(/default-src 'self'/);
      expect(csp).toMatch(/script-src 'self'(;|$)/);
      expect(csp).not.toMatch(/script-src[^;]*unsafe/);
      expect(csp).toMatch(/object-src 'none'/);
      expect(csp).toMatch(/frame-ancestors 'none'/);
      expect(csp).not.toMatch(/upgrade-insecure-requests/);
      expect(res.headers['x-content-type-options']).toBe('nosniff');
      expect(res.headers['x-frame-options']).toBe('SAMEORIGIN');
      expect(res.headers['referrer-policy']).toBe('same-origin');
      expect(res.headers['strict-transport-security']).toBeUndefined();
      expect(res.headers['x-powered-by']).toBeUndefined();
    }
  });

  it('behind https: HSTS and upgrade-insecure-requests', async () => {
    const app = await customApp({ baseURL: 'https://quasilevel.example' });
    try {
      const res = await request(app.app).get('/');
      expect(res.headers['strict-transport-security']).toMatch(/max-age=15552000/);
      expect(String(res.headers['content-security-policy'])).toMatch(/upgrade-insecure-requests/);
    } finally {
      await app.close();
    }
  });
});

describe('the pass/fail CSV is formula-safe in every text column', () => {
  it('device ids, reasons, power classes, outlier parameters and the spec name never begin with = + - @ tab or CR; numbers stay numbers', async () => {
    await signUp(h.app, { email: 'admin@csv-pv.example' });
    const tester = await signUp(h.app, { email: 'tester@csv-pv.example' });
    await signUp(h.app, { email: 'qa@csv-pv.example' });
    const [q] = await h.database.db.select().from(user).where(eq(user.email, 'qa@csv-pv.example'));
    await h.database.db.update(member).set({ role: 'qa_lead' }).where(eq(member.userId, q.id));
    const b = (await tester.post('/api/batches').send({ name: 'Formula ids', cells: 1 })).body;
    const ids = ['=HYPERLINK("http://evil.example","x")', '+SUM(1,1)', '-2+3', '@A1', '=1+2', 'plain-id'];
    let up = tester.post(`/api/batches/${b.id}/curves`);
    ids.forEach((id, k) => (up = up.attach('files', cellFile(`# device: ${id}\n`), `f${k}.csv`)));
    expect((await up).body.accepted).toBe(ids.length);

    // Labels and a name chosen to be formulas; the Pmax limit fails every device so reasons are written.
    const specs = [
      { name: '=HYPERLINK("http://evil.example","spec")', limits: { pmp_w: { min: 1000 }, ff: { max: 0.5 } }, power_classes: { bins: [{ label: '=cmd|calc', nominal_w: 0.3, min_w: 0, max_w: 0.3105 }, { label: '@SUM(A1)', nominal_w: 0.32, min_w: 0.3105, max_w: 10 }] } },
      { name: '+plus spec', limits: { pmp_w: { min: 0 } }, power_classes: { step_w: 0.01, label_prefix: '-' } },
    ];
    const qa = await signIn(h.app, 'qa@csv-pv.example', 'correct-horse-9');
    for (const body of specs) {
      const spec = await qa.post('/api/specs').send(body);
      expect(spec.status).toBe(201);
      const res = await tester.get(`/api/batches/${b.id}/pass-fail.csv?spec=${spec.body.id}`);
      expect(res.status).toBe(200);
      // Nothing but the header and one row per device (papaparse and the strict RFC 4180 reader agree).
      checkExport(res.text, ids.length);
      const parsed = Papa.parse<string[]>(res.text);
      const [header, ...deviceRows] = parsed.data;
      expect(deviceRows).toHaveLength(ids.length);
      const numeric = new Set(['isc_a', 'voc_v', 'pmp_w', 'imp_a', 'vmp_v', 'ff_pct', 'eff_pct', 'stc_pmp_w', 'n', 'rs_ohm', 'rsh_ohm', 'j0_a_cm2', 'spec_version']);
      for (const r of deviceRows) {
        r.forEach((cell, k) => {
          if (numeric.has(header[k])) {
            if (cell !== '') expect(Number.isFinite(Number(cell))).toBe(true);
          } else {
            expect(cell).not.toMatch(/^[=+\-@\t\r]/);
          }
        });
      }
      const col = (name: string) => deviceRows.map((r) => r[header.indexOf(name)]);
      // Each formula-like id comes back whole behind one leading quote (lib/quality/csv.ts).
      expect(col('device_id').sort()).toEqual(ids.map((id) => (/^[=+\-@]/.test(id) ? `'${id}` : id)).sort());
      expect(col('spec_name').every((v) => v === `'${body.name}`)).toBe(true);
      expect(col('spec_version').every((v) => v === '1')).toBe(true);
      expect(col('power_class').every((v) => v === '' || v.startsWith("'"))).toBe(true);
      expect(col('power_class').some((v) => v !== '')).toBe(true);
      if (body.name.startsWith('=')) expect(col('reasons').every((v) => /below the minimum/.test(v))).toBe(true);
    }
  });
});
