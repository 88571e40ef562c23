import { eq } from 'drizzle-orm';
import { member, organization, user } from '@/db/schema';
import { readDemoAccounts, seedDemo } from '@/db/seed';
import { ROLES } from '@/lib/auth/roles';
import { signIn, startHarness } from '@/tests/server/harness';
import type { Harness } from '@/tests/server/harness';

let h: Harness;
beforeAll(async () => {
  h = await startHarness();
});
afterAll(async () => {
  await h.close();
});

it('creates the demo organisation with one account per role, once', async () => {
  const accounts = readDemoAccounts();
  expect(accounts.map((a) => a.role).sort()).toEqual([...ROLES].sort());
  for (const a of accounts) expect(a.email).toMatch(/\.example$/); // RFC 2606 reserved domain

  expect(await seedDemo(h.database.db, h.auth)).toBe(true);
  expect(await seedDemo(h.database.db, h.auth)).toBe(false);

  const orgs = await h.database.db.select().from(organization);
  expect(orgs).toHaveLength(1);
  for (const a of accounts) {
    const rows = await h.database.db.select({ role: member.role }).from(member).innerJoin(user, eq(user.id, member.userId)).where(eq(user.email, a.email));
    expect(rows).toEqual([{ role: a.role }]);
    const agent = await signIn(h.app, a.email, a.password);
    expect((await agent.get('/api/me')).body.role).toBe(a.role);
  }
});
