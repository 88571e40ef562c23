/**
 * Regression tests of the trust findings: an unverified address saw every batch; the first
 * sign-up of a domain became administrator of everyone after; organisation endpoints showed
 * members' addresses; a password reset left old sessions alive; passwords were only 8 characters;
 * a guesser could try one account from many client addresses; sign-up told whether an address
 * had an account.
 */
import { eq } from 'drizzle-orm';
import { invitation, organization, session, signInFailure, user } from '@/db/schema';
import { agentFor, approveRequest, lastMail, signIn, signUp, startHarness, verificationPath, verifyEmail } from '@/tests/server/harness';
import type { Harness } from '@/tests/server/harness';

let h: Harness;
beforeAll(async () => {
  h = await startHarness();
});
afterAll(async () => {
  await h.close();
});

const PASSWORD = 'correct-horse-9';

async function bareSignUp(email: string, password = PASSWORD) {
  return agentFor(h.app).post('/api/auth/sign-up/email').send({ email, password, name: email.split('@')[0] });
}

async function orgOfDomain(domain: string) {
  const [o] = await h.database.db.select().from(organization).where(eq(organization.domain, domain));
  return o ?? null;
}

describe('verified membership', () => {
  it('an unverified address reaches only health, /api/me and the auth routes; no organisation is founded before verification', async () => {
    expect((await bareSignUp('first@iota-cells.example')).status).toBe(200);
    expect(await orgOfDomain('iota-cells.example')).toBeNull();
    const agent = await signIn(h.app, 'first@iota-cells.example', PASSWORD);
    const me = await agent.get('/api/me');
    expect(me.status).toBe(200);
    expect(me.body).toEqual(expect.objectContaining({ email_verified: false, account_state: 'email_unverified', organization: null, permissions: [] }));
    for (const path of ['/api/batches', '/api/specs', '/api/users', '/api/outbox', '/api/organization', '/api/invitations']) {
      const res = await agent.get(path);
      expect({ path, status: res.status, code: res.body.code }).toEqual({ path, status: 403, code: 'email_unverified' });
      expect(res.body.message).toMatch(/first@iota-cells\.example/);
    }
    expect((await agent.get('/api/health')).status).toBe(200);
    expect((await agent.get('/api/auth/get-session')).status).toBe(200);

    // The link signs in, lands on the sign-in screen's address (the app opens) and founds the organisation.
    const { agent: verified, location } = await verifyEmail(h.app, 'first@iota-cells.example');
    expect(location).toBe('/sign-in?verified=1');
    const after = await verified.get('/api/me');
    expect(after.body).toEqual(expect.objectContaining({ email_verified: true, account_state: 'active', role: 'admin' }));
    expect((await agent.get('/api/me')).body.email_verified).toBe(true); // the earlier session too
    expect((await verified.get('/api/batches')).status).toBe(200);
    expect((await orgOfDomain('iota-cells.example'))?.joinByDomain).toBe(false);
  });

  it('a forged or altered link verifies nothing and says so on the sign-in screen', async () => {
    expect((await bareSignUp('forger@kappa-pv.example')).status).toBe(200);
    const path = await verificationPath(h.app, 'forger@kappa-pv.example');
    const res = await agentFor(h.app).get(path.replace(/token=([^&]+)/, (_m, t: string) => `token=${t.slice(0, -4)}AAAA`));
    expect(res.status).toBe(302);
    expect(res.headers.location).toMatch(/^\/sign-in\?verified=1&error=INVALID_TOKEN$/);
    expect(res.headers['set-cookie']).toBeUndefined();
    const [u] = await h.database.db.select().from(user).where(eq(user.email, 'forger@kappa-pv.example'));
    expect(u.emailVerified).toBe(false);
  });

  it('with joining by domain off, a verified newcomer waits for an administrator, who is mailed and approves with a role', async () => {
    const admin = await signUp(h.app, { email: 'boss@lambda-mod.example' });
    const newcomer = await signUp(h.app, { email: 'new.hire@lambda-mod.example' }, { approve: false });
    const me = await newcomer.get('/api/me');
    expect(me.body).toEqual(expect.objectContaining({ email_verified: true, account_state: 'awaiting_approval', organization: null, role: null }));
    expect(me.body.join_request).toEqual(expect.objectContaining({ status: 'pending', organization_name: 'lambda-mod.example' }));
    const denied = await newcomer.get('/api/batches');
    expect(denied.status).toBe(403);
    expect(denied.body.code).toBe('no_organisation');
    expect((await lastMail(h.app, 'boss@lambda-mod.example', 'membership-request'))?.body).toMatch(/new\.hire@lambda-mod\.example/);

    const list = await admin.get('/api/membership-requests');
    expect(list.status).toBe(200);
    const req = list.body.requests.find((r: { email: string }) => r.email === 'new.hire@lambda-mod.example');
    expect(req).toBeDefined();
    const missingRole = await admin.post(`/api/membership-requests/${req.id}/decision`).send({ decision: 'approve' });
    expect(missingRole.status).toBe(400);
    const ok = await admin.post(`/api/membership-requests/${req.id}/decision`).send({ decision: 'approve', role: 'designer' });
    expect(ok.status).toBe(200);
    expect((await newcomer.get('/api/me')).body).toEqual(expect.objectContaining({ account_state: 'active', role: 'designer' }));
    expect((await newcomer.get('/api/batches')).status).toBe(200);
    expect((await admin.post(`/api/membership-requests/${req.id}/decision`).send({ decision: 'refuse' })).status).toBe(409);
    expect((await lastMail(h.app, 'new.hire@lambda-mod.example', 'membership-approved'))?.body).toMatch(/Designer/);

    const audit = await admin.get('/api/organization/audit');
    const approved = audit.body.entries.find((e: { action: string }) => e.action === 'request_approved');
    expect(approved).toEqual(expect.objectContaining({ subject_email: 'new.hire@lambda-mod.example', details: { role: 'designer' } }));
    expect(approved.actor_name).toMatch(/boss@lambda-mod\.example/);
    expect(Date.parse(approved.created_at)).toBeGreaterThan(Date.now() - 600_000);
  });

  it('a refused newcomer stays outside; with joining by domain turned on, the next one joins as test engineer at once', async () => {
    const admin = await signUp(h.app, { email: 'boss@mu-cells.example' });
    const refused = await signUp(h.app, { email: 'stranger@mu-cells.example' }, { approve: false });
    const [req] = (await admin.get('/api/membership-requests')).body.requests;
    expect((await admin.post(`/api/membership-requests/${req.id}/decision`).send({ decision: 'refuse' })).status).toBe(200);
    expect((await refused.get('/api/me')).body.account_state).toBe('refused');
    expect((await refused.get('/api/batches')).status).toBe(403);

    const designer = await signUp(h.app, { email: 'designer@mu-cells.example' });
    const asDesigner = await designer.patch('/api/organization').send({ join_by_domain: true });
    expect(asDesigner.status).toBe(403);
    const set = await admin.patch('/api/organization').send({ join_by_domain: true });
    expect(set.status).toBe(200);
    expect(set.body.join_by_domain).toBe(true);
    const joined = await signUp(h.app, { email: 'operator@mu-cells.example' }, { approve: false });
    expect((await joined.get('/api/me')).body).toEqual(expect.objectContaining({ account_state: 'active', role: 'test_engineer' }));
    const actions = (await admin.get('/api/organization/audit')).body.entries.map((e: { action: string }) => e.action);
    expect(actions).toEqual(expect.arrayContaining(['request_refused', 'setting_changed', 'joined_by_domain', 'organisation_founded']));
  });

  it('an invitation gives its role on verification, even to an address of another domain; a withdrawn one gives nothing', async () => {
    const admin = await signUp(h.app, { email: 'boss@nu-solar.example' });
    const inv = await admin.post('/api/invitations').send({ email: 'Contractor@Outside-Lab.example', role: 'qa_lead' });
    expect(inv.status).toBe(201);
    expect(inv.body).toEqual(expect.objectContaining({ email: 'contractor@outside-lab.example', role: 'qa_lead', status: 'pending' }));
    expect((await lastMail(h.app, 'contractor@outside-lab.example', 'invitation'))?.body).toMatch(/QA lead/);
    expect((await admin.get('/api/invitations')).body.invitations.map((i: { email: string }) => i.email)).toContain('contractor@outside-lab.example');

    const invited = await signUp(h.app, { email: 'contractor@outside-lab.example' }, { approve: false });
    const me = await invited.get('/api/me');
    expect(me.body).toEqual(expect.objectContaining({ account_state: 'active', role: 'qa_lead' }));
    expect(me.body.organization.domain).toBe('nu-solar.example');
    expect(await orgOfDomain('outside-lab.example')).toBeNull();
    expect((await admin.get('/api/invitations')).body.invitations).toHaveLength(0);

    const again = await admin.post('/api/invitations').send({ email: 'contractor@outside-lab.example', role: 'designer' });
    expect(again.status).toBe(409);
    expect(again.body.code).toBe('already_member');

    const withdrawn = await admin.post('/api/invitations').send({ email: 'late@nu-solar.example', role: 'admin' });
    expect((await admin.delete(`/api/invitations/${withdrawn.body.id}`)).status).toBe(200);
    const [row] = await h.database.db.select().from(invitation).where(eq(invitation.id, withdrawn.body.id));
    expect(row.status).toBe('canceled');
    const late = await signUp(h.app, { email: 'late@nu-solar.example' }, { approve: false });
    expect((await late.get('/api/me')).body.account_state).toBe('awaiting_approval');
    expect(await approveRequest(h.app, 'late@nu-solar.example', 'designer')).toBe(true);
  });
});

describe('the users screen’s changes', () => {
  const org = 'xi-modules.example';
  let admin: ReturnType<typeof agentFor>;
  let idOf: (email: string) => Promise<string>;

  beforeAll(async () => {
    admin = await signUp(h.app, { email: `admin@${org}` });
    await signUp(h.app, { email: `tester@${org}` });
    idOf = async (email) => (await h.database.db.select().from(user).where(eq(user.email, email)))[0].id;
  });

  it('a role change is recorded with both roles; deactivation ends the sessions and refuses access; reactivation restores it', async () => {
    const tester = await signIn(h.app, `tester@${org}`, PASSWORD);
    const id = await idOf(`tester@${org}`);
    expect((await admin.patch(`/api/users/${id}/role`).send({ role: 'qa_lead' })).status).toBe(200);
    const entries = (await admin.get('/api/organization/audit')).body.entries;
    expect(entries[0]).toEqual(expect.objectContaining({ action: 'role_changed', subject_email: `tester@${org}`, details: { from_role: 'test_engineer', to_role: 'qa_lead' } }));

    expect((await admin.patch(`/api/users/${id}/active`).send({ active: false })).status).toBe(200);
    expect((await tester.get('/api/batches')).status).toBe(401); // signed out everywhere
    const back = await signIn(h.app, `tester@${org}`, PASSWORD);
    expect((await back.get('/api/me')).body.account_state).toBe('deactivated');
    const refused = await back.get('/api/batches');
    expect(refused.status).toBe(403);
    expect(refused.body.code).toBe('deactivated');
    const listed = (await admin.get('/api/users')).body.users.find((u: { email: string }) => u.email === `tester@${org}`);
    expect(listed.active).toBe(false);

    expect((await admin.patch(`/api/users/${id}/active`).send({ active: true })).status).toBe(200);
    expect((await back.get('/api/batches')).status).toBe(200);
  });

  it('removal takes the member out (account kept); the last active administrator cannot be demoted, deactivated or removed', async () => {
    await signUp(h.app, { email: `leaving@${org}` });
    const leaving = await signIn(h.app, `leaving@${org}`, PASSWORD);
    expect((await admin.delete(`/api/users/${await idOf(`leaving@${org}`)}`)).status).toBe(200);
    const again = await signIn(h.app, `leaving@${org}`, PASSWORD);
    expect((await again.get('/api/me')).body.account_state).toBe('no_organisation');
    expect((await leaving.get('/api/me')).status).toBe(401);

    const self = await idOf(`admin@${org}`);
    expect((await admin.patch(`/api/users/${self}/role`).send({ role: 'designer' })).body.code).toBe('last_admin');
    expect((await admin.patch(`/api/users/${self}/active`).send({ active: false })).status).toBe(409);
    expect((await admin.delete(`/api/users/${self}`)).status).toBe(409);
    const actions = (await admin.get('/api/organization/audit')).body.entries.map((e: { action: string }) => e.action);
    expect(actions).toEqual(expect.arrayContaining(['removed', 'deactivated', 'reactivated', 'role_changed']));
  });

  it('better-auth’s organisation endpoints show no addresses to non-admins and take no changes from anyone', async () => {
    const tester = await signIn(h.app, `tester@${org}`, PASSWORD);
    const orgId = (await tester.get('/api/me')).body.organization.id;
    for (const path of ['list-members', 'get-full-organization', 'list-invitations']) {
      const res = await tester.get(`/api/auth/organization/${path}?organizationId=${orgId}`);
      expect({ path, status: res.status }).toEqual({ path, status: 403 });
      expect(JSON.stringify(res.body)).not.toContain(`admin@${org}`);
    }
    const own = await tester.get('/api/auth/organization/list');
    expect(own.status).toBe(200);
    expect(JSON.stringify(own.body)).not.toMatch(/@/);
    const members = await admin.get(`/api/auth/organization/list-members?organizationId=${orgId}`);
    expect(members.status).toBe(200);
    expect(JSON.stringify(members.body)).toContain(`tester@${org}`);
    const id = await idOf(`tester@${org}`);
    for (const [path, body] of [
      ['update-member-role', { memberId: id, role: 'admin', organizationId: orgId }],
      ['remove-member', { memberIdOrEmail: `tester@${org}`, organizationId: orgId }],
      ['invite-member', { email: 'x@y.example', role: 'admin', organizationId: orgId }],
    ] as const) {
      expect({ path, status: (await admin.post(`/api/auth/organization/${path}`).send(body)).status }).toEqual({ path, status: 403 });
    }
    const outsider = await agentFor(h.app).get(`/api/auth/organization/list-members?organizationId=${orgId}`);
    expect(outsider.status).toBe(401);
  });
});

describe('sessions and passwords', () => {
  it('refuses weak passwords on sign-up and reset with the reason, and a reset ends every session', async () => {
    const short = await bareSignUp('weak@omicron-pv.example', 'Ab1!Ab1!Ab1');
    expect(short.status).toBe(400);
    expect(short.body.message).toMatch(/at least 12 characters/);
    const common = await bareSignUp('weak@omicron-pv.example', 'password1234');
    expect(common.status).toBe(400);
    expect(common.body.code).toBe('WEAK_PASSWORD');
    expect(common.body.message).toMatch(/too easy to guess/);
    // The address itself scores 4 of 4 on its own; as the person's own address it is guessable.
    const ownAddress = await bareSignUp('weak@omicron-pv.example', 'weak@omicron-pv.example');
    expect(ownAddress.status).toBe(400);
    expect(ownAddress.body.message).toMatch(/personal/);
    expect(await h.database.db.select().from(user).where(eq(user.email, 'weak@omicron-pv.example'))).toHaveLength(0);

    await signUp(h.app, { email: 'reset@omicron-pv.example' });
    const phone = await signIn(h.app, 'reset@omicron-pv.example', PASSWORD);
    const laptop = await signIn(h.app, 'reset@omicron-pv.example', PASSWORD);
    await agentFor(h.app).post('/api/auth/request-password-reset').send({ email: 'reset@omicron-pv.example', redirectTo: '/reset-password' });
    const token = (await lastMail(h.app, 'reset@omicron-pv.example', 'password-reset'))!.body.match(/reset-password\/([A-Za-z0-9_-]+)/)![1];
    const weak = await agentFor(h.app).post('/api/auth/reset-password').send({ token, newPassword: 'qwertyuiop12' });
    expect(weak.status).toBe(400);
    expect(weak.body.code).toBe('WEAK_PASSWORD');
    expect((await phone.get('/api/me')).status).toBe(200);
    const ok = await agentFor(h.app).post('/api/auth/reset-password').send({ token, newPassword: 'ledger-quartz-overcast-71' });
    expect(ok.status).toBe(200);
    expect((await phone.get('/api/me')).status).toBe(401);
    expect((await laptop.get('/api/me')).status).toBe(401);
    const [u] = await h.database.db.select().from(user).where(eq(user.email, 'reset@omicron-pv.example'));
    expect(await h.database.db.select().from(session).where(eq(session.userId, u.id))).toHaveLength(0);
  });

  it('after 5 failed sign-ins within 15 minutes an account is refused with 429 from any client, until the window passes', async () => {
    await signUp(h.app, { email: 'target@pi-cells.example' });
    await signUp(h.app, { email: 'bystander@pi-cells.example' });
    for (let i = 0; i < 5; i++) {
      const res = await agentFor(h.app).post('/api/auth/sign-in/email').send({ email: 'target@pi-cells.example', password: `wrong-guess-${i}` });
      expect(res.status).toBe(401);
    }
    const blocked = await agentFor(h.app).post('/api/auth/sign-in/email').send({ email: 'TARGET@pi-cells.example', password: PASSWORD });
    expect(blocked.status).toBe(429);
    expect(blocked.body.message).toMatch(/Try again in 15 minutes/);
    expect(Number(blocked.headers['retry-after'])).toBeGreaterThan(14 * 60);
    expect(blocked.headers['set-cookie']).toBeUndefined();
    // The same answer for an address without an account: nothing tells them apart.
    for (let i = 0; i < 5; i++) await agentFor(h.app).post('/api/auth/sign-in/email').send({ email: 'nobody@pi-cells.example', password: `wrong-guess-${i}` });
    expect((await agentFor(h.app).post('/api/auth/sign-in/email').send({ email: 'nobody@pi-cells.example', password: 'x' })).status).toBe(429);
    await signIn(h.app, 'bystander@pi-cells.example', PASSWORD);

    // 15 minutes later (moved back in the table) the right password works and clears the count.
    await h.database.db.update(signInFailure).set({ createdAt: new Date(Date.now() - 15 * 60 * 1000 - 1000) }).where(eq(signInFailure.email, 'target@pi-cells.example'));
    await signIn(h.app, 'target@pi-cells.example', PASSWORD);
    expect(await h.database.db.select().from(signInFailure).where(eq(signInFailure.email, 'target@pi-cells.example'))).toHaveLength(0);
  });
});
