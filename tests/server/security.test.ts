/**
 * Security checks not covered elsewhere (issue 8, item 2). Already tested and not repeated here:
 * the sign-in limit and forged client-address headers (rate-limit.test.ts), httpOnly + SameSite
 * cookies and an expired session row (auth.test.ts), another organisation's records (access-matrix).
 * Added: what the limit does to the right password and to other endpoints and when it lifts;
 * a session's lifetime and its real expiry and revocation; the Secure cookie behind https;
 * better-auth's organisation endpoints not bypassing the role table; uploads never touching the
 * file system; and the pass/fail CSV formula-safe in every text column.
 */
import fs from 'node:fs';
import { createRequire } from 'node:module';
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
import { createAuth } from '@/server/auth';
import { createMailer } from '@/server/mail';
import { agentFor, signIn, signUp, startHarness } from '@/tests/server/harness';
import type { Harness } from '@/tests/server/harness';
import { openTestDatabase } from '@/tests/support/test-database';

/** The benchmark cell simulated from its published optimum (tests/fixtures/reference-data/README.md). */
const cellRows = (() => {
  const c = simulateCurve({ iph_a: 0.760788, i0_a: 3.1068e-7, n: 1.47727, rs_ohm: 0.036547, rsh_ohm: 52.89 }, { cells: 1, temp_c: 33, points: 30 });
  return ['V,I', ...c.voltage_v.map((v, k) => `${v},${c.current_a[k]}`)].join('\n');
})();
const cellFile = (header = '') => Buffer.from(header + cellRows);

/** An app like the harness's, with the auth settings the harness does not expose. */
async function customApp(opts: { baseURL: string; sessionSeconds?: number }) {
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
  const app = createApp({ db: database.db, auth, mailer });
  return {
    app,
    database,
    agent: () => request.agent(app).set('Origin', opts.baseURL),
    close: async () => {
      await database.close();
      fs.rmSync(outboxDir, { recursive: true, force: true });
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

describe('uploads never write to the file system', () => {
  let tester: Awaited<ReturnType<typeof signUp>>;
  let batchId: string;
  beforeAll(async () => {
    await signUp(h.app, { email: 'admin@files-pv.example' });
    tester = await signUp(h.app, { email: 'tester@files-pv.example' });
    batchId = (await tester.post('/api/batches').send({ name: 'Path names', cells: 1 })).body.id;
  });
  afterAll(() => {
    jest.restoreAllMocks();
  });

  it('files named with ../, absolute and Windows paths are read from memory, stored as text and their ids are the bare names; no file appears anywhere', async () => {
    const tag = `ql-escape-${process.pid}-${Date.now()}`;
    const names = [`../../${tag}-a.csv`, `/tmp/${tag}-b.csv`, `..\\..\\${tag}-c.csv`, `sub/dir/${tag}-d.csv`, `${os.tmpdir()}/../${tag}-e.csv`];
    const writers = ['writeFile', 'writeFileSync', 'createWriteStream', 'open', 'openSync', 'appendFile', 'appendFileSync', 'mkdir', 'mkdirSync', 'rename', 'renameSync', 'copyFile', 'copyFileSync'] as const;
    const spies = writers.map((w) => jest.spyOn(fs, w));
    // The `fs` multer loads is the very object spied on here (core modules are shared), so a
    // disk-storage write anywhere in the upload path would be seen.
    expect(createRequire(require.resolve('multer'))('fs')).toBe(fs);
    expect(jest.isMockFunction(fs.createWriteStream)).toBe(true);
    const promiseSpies = (['writeFile', 'open', 'mkdir', 'appendFile', 'rename', 'copyFile'] as const).map((w) => jest.spyOn(fs.promises, w));
    let req = tester.post(`/api/batches/${batchId}/curves`).field('on_duplicate', 'keep');
    for (const n of names) req = req.attach('files', cellFile(), n);
    const res = await req;
    const calls = [...spies, ...promiseSpies].flatMap((s) => s.mock.calls.map((c) => String(c[0])));
    for (const s of [...spies, ...promiseSpies]) s.mockRestore();

    expect(res.status).toBe(201);
    expect(calls).toEqual([]);
    const results = res.body.results as { file: string; accepted: boolean; curve_id: string; device_id: string }[];
    expect(results.map((r) => r.accepted)).toEqual(names.map(() => true));
    for (const [k, r] of results.entries()) {
      const [row] = await h.database.db.select({ fileName: curve.fileName, deviceId: curve.deviceId }).from(curve).where(eq(curve.id, r.curve_id));
      // The multipart reader keeps only the last path segment; the id is that name without its extension.
      expect(row.fileName).toBe(`${tag}-${'abcde'[k]}.csv`);
      expect(row.deviceId).toBe(`${tag}-${'abcde'[k]}`);
    }
    // repository-check: outside on purpose: the upload names above climb out of the working folder, so look there too.
    const places = [process.cwd(), path.resolve(process.cwd(), '..'), path.resolve(process.cwd(), '../..'), dataDir(), os.tmpdir(), '/tmp', '/'];
    for (const dir of places) {
      const listing = fs.existsSync(dir) ? fs.readdirSync(dir) : [];
      expect(listing.filter((f) => f.includes(tag))).toEqual([]);
    }
  });
});

describe('the pass/fail CSV is formula-safe in every text column', () => {
  it('device ids, reasons, power classes, outlier parameters and the spec version never begin with = + - @ tab or CR; numbers stay numbers', async () => {
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
      const parsed = Papa.parse<string[]>(res.text.trim(), { skipEmptyLines: true });
      const [header, ...rows] = parsed.data;
      const deviceRows = rows.filter((r) => r.length === header.length);
      expect(deviceRows).toHaveLength(ids.length);
      const numeric = new Set(['isc_a', 'voc_v', 'pmp_w', 'imp_a', 'vmp_v', 'ff', 'efficiency', 'stc_pmp_w', 'n', 'rs_ohm', 'rsh_ohm', 'j0_a_cm2']);
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
      expect(col('spec_version').every((v) => v === `'${body.name} v1`)).toBe(true);
      expect(col('power_class').every((v) => v === '' || v.startsWith("'"))).toBe(true);
      expect(col('power_class').some((v) => v !== '')).toBe(true);
      if (body.name.startsWith('=')) expect(col('reasons').every((v) => /below the minimum/.test(v))).toBe(true);
      // The caution line after the table starts with "#" (a comment), not a formula.
      expect(rows[rows.length - 1][0]).toMatch(/^#/);
    }
  });
});
