/**
 * The server reuses a resolved caller (session, user, organisation, role) for a few seconds
 * instead of three database round trips a request. What must hold anyway: signing out, a role
 * change and a session's expiry take effect at once; only an edit of the database behind the
 * server's back waits out the cache's lifetime.
 */
import { eq } from 'drizzle-orm';
import request from 'supertest';
import { session, user } from '@/db/schema';
import { CallerCache } from '@/server/permissions';
import type { Caller } from '@/server/permissions';
import { agentFor, signIn, signUp, startHarness } from '@/tests/server/harness';
import type { Harness } from '@/tests/server/harness';

const TTL_MS = 60_000;
let h: Harness;

beforeAll(async () => {
  h = await startHarness({ sessionCacheMs: TTL_MS });
  await signUp(h.app, { email: 'admin@cache-pv.example' }); // the first of a domain is its administrator
  await signUp(h.app, { email: 'tester@cache-pv.example' });
});
afterAll(() => h.close());

/** The session cookie pair a sign-in sets. */
async function cookieOf(email: string): Promise<string> {
  const res = await agentFor(h.app).post('/api/auth/sign-in/email').send({ email, password: 'correct-horse-9' });
  expect(res.status).toBe(200);
  const set = ([] as string[]).concat(res.headers['set-cookie'] ?? []);
  return set.map((c) => c.split(';')[0]).join('; ');
}

it('reuses the resolved caller: the session row is not read again within the lifetime', async () => {
  const jar = await cookieOf('tester@cache-pv.example');
  expect((await request(h.app).get('/api/me').set('Cookie', jar)).status).toBe(200);
  // Behind the server's back: the sessions vanish from the database. The cached caller still answers…
  const [u] = await h.database.db.select().from(user).where(eq(user.email, 'tester@cache-pv.example'));
  await h.database.db.delete(session).where(eq(session.userId, u.id));
  const again = await request(h.app).get('/api/me').set('Cookie', jar);
  expect(again.status).toBe(200);
  expect(again.body.role).toBe('test_engineer');
  // …until any change through the product clears the cache; then the missing session is noticed.
  await agentFor(h.app).post('/api/auth/sign-in/email').send({ email: 'admin@cache-pv.example', password: 'wrong-password' });
  expect((await request(h.app).get('/api/me').set('Cookie', jar)).status).toBe(401);
});

it('sign-out takes effect at once although the caller was cached', async () => {
  const jar = await cookieOf('tester@cache-pv.example');
  expect((await request(h.app).get('/api/me').set('Cookie', jar)).status).toBe(200);
  expect((await request(h.app).get('/api/batches').set('Cookie', jar)).status).toBe(200);
  expect((await agentFor(h.app).post('/api/auth/sign-out').set('Cookie', jar).send({})).status).toBe(200);
  const replay = await request(h.app).get('/api/batches').set('Cookie', jar);
  expect(replay.status).toBe(401);
  expect(replay.body.code).toBe('unauthenticated');
});

it('a role change by the administrator applies to the member’s next request', async () => {
  const tester = await signIn(h.app, 'tester@cache-pv.example', 'correct-horse-9');
  expect((await tester.post('/api/batches').send({ name: 'Before the change' })).status).toBe(201);
  const admin = await signIn(h.app, 'admin@cache-pv.example', 'correct-horse-9');
  const [u] = await h.database.db.select().from(user).where(eq(user.email, 'tester@cache-pv.example'));
  expect((await admin.patch(`/api/users/${u.id}/role`).send({ role: 'designer' })).status).toBe(200);
  const after = await tester.post('/api/batches').send({ name: 'After the change' });
  expect(after.status).toBe(403);
  expect((await tester.get('/api/me')).body.role).toBe('designer');
});

describe('CallerCache', () => {
  const caller = { user: { id: 'u', name: 'U', email: 'u@x.example' }, sessionId: 's', organization: { id: 'o', name: 'O', domain: 'x.example' }, memberId: 'm', role: 'designer' } as Caller;

  it('keeps an entry for its lifetime, never past the session’s expiry', () => {
    const c = new CallerCache(5000);
    c.set('a', caller, new Date(1_000_000 + 60_000), 1_000_000);
    expect(c.get('a', 1_004_999)).toBe(caller);
    expect(c.get('a', 1_005_000)).toBeNull();
    c.set('b', caller, new Date(1_000_000 + 1000), 1_000_000); // the session ends in 1 s
    expect(c.get('b', 1_000_999)).toBe(caller);
    expect(c.get('b', 1_001_000)).toBeNull();
  });

  it('holds a bounded number of entries, dropping the oldest', () => {
    const c = new CallerCache(5000, 3);
    for (const k of ['a', 'b', 'c', 'd']) c.set(k, caller, new Date(Date.now() + 60_000));
    expect(c.size).toBe(3);
    expect(c.get('a')).toBeNull();
    expect(c.get('d')).toBe(caller);
  });

  it('with a lifetime of 0 keeps nothing', () => {
    const c = new CallerCache(0);
    c.set('a', caller, new Date(Date.now() + 60_000));
    expect(c.get('a')).toBeNull();
  });
});
