import { eq } from 'drizzle-orm';
import { member, session, user } from '@/db/schema';
import { agentFor, lastMail, signIn, signUp, startHarness } from '@/tests/server/harness';
import type { Harness } from '@/tests/server/harness';

let h: Harness;
beforeAll(async () => {
  h = await startHarness();
});
afterAll(async () => {
  await h.close();
});

async function setRole(email: string, role: string) {
  const [u] = await h.database.db.select().from(user).where(eq(user.email, email));
  await h.database.db.update(member).set({ role }).where(eq(member.userId, u.id));
}

describe('health', () => {
  it('answers ok with the version, without a session', async () => {
    const res = await agentFor(h.app).get('/api/health');
    expect(res.status).toBe(200);
    expect(res.body).toEqual(expect.objectContaining({ ok: true, version: expect.stringMatching(/^\d+\.\d+\.\d+/) }));
  });
});

describe('sign-up places people by e-mail domain', () => {
  it('founds an organisation for a new domain with the first verified user as admin; later users join once approved (as test engineers here)', async () => {
    const first = await signUp(h.app, { email: 'founder@alpha-cells.example' });
    const me1 = await first.get('/api/me');
    expect(me1.status).toBe(200);
    expect(me1.body.role).toBe('admin');
    expect(me1.body.organization.domain).toBe('alpha-cells.example');

    const second = await signUp(h.app, { email: 'Flash.Operator@Alpha-Cells.example' });
    const me2 = await second.get('/api/me');
    expect(me2.body.role).toBe('test_engineer');
    expect(me2.body.organization.id).toBe(me1.body.organization.id);
    expect(me2.body.permissions).toContain('batch:write');
    expect(me2.body.permissions).not.toContain('users:manage');
  });

  it('answers a sign-up with a taken address like a new one, keeps one account and its password, and mails the owner', async () => {
    await signUp(h.app, { email: 'dup@beta-modules.example' });
    const taken = await agentFor(h.app).post('/api/auth/sign-up/email').send({ email: 'dup@beta-modules.example', password: 'another-pass-1', name: 'Dup' });
    const fresh = await agentFor(h.app).post('/api/auth/sign-up/email').send({ email: 'fresh@beta-modules.example', password: 'another-pass-1', name: 'Dup' });
    expect(taken.status).toBe(200);
    expect(taken.status).toBe(fresh.status);
    // Same fields with the same kinds of value; neither answer signs anyone in.
    const shape = (b: { token: unknown; user: Record<string, unknown> }) => ({ token: b.token, user: Object.fromEntries(Object.entries(b.user).map(([k, v]) => [k, typeof v])) });
    expect(shape(taken.body)).toEqual(shape(fresh.body));
    expect(taken.body.user.emailVerified).toBe(false);
    expect(taken.headers['set-cookie']).toBeUndefined();
    expect(fresh.headers['set-cookie']).toBeUndefined();
    const rows = await h.database.db.select().from(user).where(eq(user.email, 'dup@beta-modules.example'));
    expect(rows).toHaveLength(1);
    expect((await lastMail(h.app, 'dup@beta-modules.example', 'sign-up-existing'))?.body).toMatch(/already has one/);
    expect(await lastMail(h.app, 'fresh@beta-modules.example', 'verify-email')).not.toBeNull();
    await signIn(h.app, 'dup@beta-modules.example', 'correct-horse-9');
  });

  it('refuses a short password', async () => {
    const res = await agentFor(h.app).post('/api/auth/sign-up/email').send({ email: 'short@gamma.example', password: 'abc', name: 'S' });
    expect(res.status).toBe(400);
    expect(res.body.message).toMatch(/password/i);
  });
});

describe('sign-in', () => {
  beforeAll(async () => {
    await signUp(h.app, { email: 'signin@delta-pv.example', password: 'right-password-1' });
  });

  it.each([
    ['wrong password', 'signin@delta-pv.example', 'wrong-password-1'],
    ['unknown e-mail', 'nobody@delta-pv.example', 'right-password-1'],
  ])('%s gets 401 with a message, no cookie', async (_label, email, password) => {
    const res = await agentFor(h.app).post('/api/auth/sign-in/email').send({ email, password });
    expect(res.status).toBe(401);
    expect(res.body).toEqual(expect.objectContaining({ code: expect.any(String), message: expect.any(String) }));
    expect(res.headers['set-cookie']).toBeUndefined();
  });

  it('sets an httpOnly, SameSite session cookie', async () => {
    const res = await agentFor(h.app).post('/api/auth/sign-in/email').send({ email: 'signin@delta-pv.example', password: 'right-password-1' });
    expect(res.status).toBe(200);
    const cookies: string[] = ([] as string[]).concat(res.headers['set-cookie'] ?? []);
    const token = cookies.find((c) => c.includes('session_token'));
    expect(token).toBeDefined();
    expect(token).toMatch(/HttpOnly/i);
    expect(token).toMatch(/SameSite=Lax/i);
  });

  it('an expired session is refused with 401', async () => {
    const agent = await signIn(h.app, 'signin@delta-pv.example', 'right-password-1');
    expect((await agent.get('/api/me')).status).toBe(200);
    const [u] = await h.database.db.select().from(user).where(eq(user.email, 'signin@delta-pv.example'));
    await h.database.db.update(session).set({ expiresAt: new Date(Date.now() - 1000) }).where(eq(session.userId, u.id));
    const res = await agent.get('/api/me');
    expect(res.status).toBe(401);
    expect(res.body.code).toBe('unauthenticated');
  });
});

describe('roles are enforced on the server', () => {
  const org = 'epsilon-solar.example';
  const people = {
    admin: `admin@${org}`,
    test_engineer: `tester@${org}`,
    designer: `designer@${org}`,
    qa_lead: `qa@${org}`,
  } as const;

  beforeAll(async () => {
    for (const email of Object.values(people)) await signUp(h.app, { email });
    await setRole(people.designer, 'designer');
    await setRole(people.qa_lead, 'qa_lead');
  });

  it('a guarded route without a session gets 401', async () => {
    for (const path of ['/api/me', '/api/users', '/api/outbox']) {
      const res = await agentFor(h.app).get(path);
      expect(res.status).toBe(401);
      expect(res.body.code).toBe('unauthenticated');
    }
  });

  it.each([
    ['test_engineer', 403],
    ['designer', 403],
    ['qa_lead', 403],
    ['admin', 200],
  ] as const)('GET /api/users as %s → %i', async (role, status) => {
    const agent = await signIn(h.app, people[role], 'correct-horse-9');
    const me = await agent.get('/api/me');
    expect(me.body.role).toBe(role);
    const res = await agent.get('/api/users');
    expect(res.status).toBe(status);
    if (status === 403) expect(res.body).toEqual({ code: 'forbidden', message: expect.stringContaining(role) });
  });

  it('an admin sees only their own organisation and can change a role', async () => {
    const admin = await signIn(h.app, people.admin, 'correct-horse-9');
    const list = await admin.get('/api/users');
    const emails = list.body.users.map((u: { email: string }) => u.email);
    expect(emails.sort()).toEqual(Object.values(people).sort());

    const tester = list.body.users.find((u: { email: string }) => u.email === people.test_engineer);
    const changed = await admin.patch(`/api/users/${tester.id}/role`).send({ role: 'qa_lead' });
    expect(changed.status).toBe(200);
    const testerAgent = await signIn(h.app, people.test_engineer, 'correct-horse-9');
    expect((await testerAgent.get('/api/me')).body.role).toBe('qa_lead');
    await setRole(people.test_engineer, 'test_engineer');
  });

  it('an admin cannot reach users of another organisation', async () => {
    const outsider = await signUp(h.app, { email: 'boss@zeta-other.example' });
    const [victim] = await h.database.db.select().from(user).where(eq(user.email, people.designer));
    const res = await outsider.patch(`/api/users/${victim.id}/role`).send({ role: 'admin' });
    expect(res.status).toBe(404);
    const [m] = await h.database.db.select().from(member).where(eq(member.userId, victim.id));
    expect(m.role).toBe('designer');
  });

  it('rejects an unknown role and malformed JSON with 400 and changes nothing', async () => {
    const admin = await signIn(h.app, people.admin, 'correct-horse-9');
    const [d] = await h.database.db.select().from(user).where(eq(user.email, people.designer));
    const bad = await admin.patch(`/api/users/${d.id}/role`).send({ role: 'overlord' });
    expect(bad.status).toBe(400);
    expect(bad.body.code).toBe('invalid_input');
    const malformed = await admin.patch(`/api/users/${d.id}/role`).set('Content-Type', 'application/json').send('{"role": ');
    expect(malformed.status).toBe(400);
    expect(malformed.body.code).toBe('malformed_json');
    const [m] = await h.database.db.select().from(member).where(eq(member.userId, d.id));
    expect(m.role).toBe('designer');
  });

  it('the only admin cannot demote themselves', async () => {
    const admin = await signIn(h.app, people.admin, 'correct-horse-9');
    const me = await admin.get('/api/me');
    const res = await admin.patch(`/api/users/${me.body.user.id}/role`).send({ role: 'designer' });
    expect(res.status).toBe(409);
    expect(res.body.code).toBe('last_admin');
  });
});

describe('unknown API routes', () => {
  it('get a JSON 404, not the web app', async () => {
    const res = await agentFor(h.app).get('/api/no-such-thing');
    expect(res.status).toBe(404);
    expect(res.body).toEqual({ code: 'no_such_route', message: expect.stringContaining('/no-such-thing') });
  });
});

describe('password reset by e-mail', () => {
  it('mails a link whose token sets a new password; the old one stops working', async () => {
    await signUp(h.app, { email: 'forgetful@eta-lab.example', password: 'old-password-1' });
    const before = h.mails().length;
    const req = await agentFor(h.app).post('/api/auth/request-password-reset').send({ email: 'forgetful@eta-lab.example', redirectTo: '/reset-password' });
    expect(req.status).toBe(200);
    const mails = h.mails();
    expect(mails.length).toBe(before + 1);
    const mail = mails[mails.length - 1];
    expect(mail).toMatch(/To: forgetful@eta-lab\.example/);
    const link = mail.replace(/=\r?\n/g, '').match(/https?:\/\/\S+\/reset-password\/([A-Za-z0-9_-]+)/);
    expect(link).not.toBeNull();
    const token = link![1];

    const reset = await agentFor(h.app).post('/api/auth/reset-password').send({ token, newPassword: 'new-password-2' });
    expect(reset.status).toBe(200);
    const oldTry = await agentFor(h.app).post('/api/auth/sign-in/email').send({ email: 'forgetful@eta-lab.example', password: 'old-password-1' });
    expect(oldTry.status).toBe(401);
    await signIn(h.app, 'forgetful@eta-lab.example', 'new-password-2');

    const reuse = await agentFor(h.app).post('/api/auth/reset-password').send({ token, newPassword: 'third-password-3' });
    expect(reuse.status).toBe(400);
  });
});
