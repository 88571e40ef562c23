import { eq } from 'drizzle-orm';
import { batch, curve, member, organization, user } from '@/db/schema';
import { readDemoAccounts, seedDemo } from '@/server/services/seed';
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
  // The demo batches come in through the upload pipeline: every file fitted and stored once.
  const batches = await h.database.db.select().from(batch);
  expect(batches.length).toBeGreaterThanOrEqual(3);
  const curves = await h.database.db.select({ deviceId: curve.deviceId, flags: curve.flagCodes }).from(curve);
  expect(new Set(curves.map((c) => c.deviceId)).size).toBe(curves.length);
  // The deliberate defects of the demo scenario show up as flags (scripts/make-sample-data.ts).
  const flagsOf = (id: string) => curves.find((c) => c.deviceId === id)?.flags.split(' ') ?? [];
  expect(flagsOf('KF-C24-0017')).toContain('low-shunt');
  expect(flagsOf('M2611-009')).toContain('high-series-resistance');
  expect(flagsOf('M2611-015')).toContain('step');
  expect(flagsOf('M2611-001')).toEqual(['']);
  for (const a of accounts) {
    const rows = await h.database.db.select({ role: member.role }).from(member).innerJoin(user, eq(user.id, member.userId)).where(eq(user.email, a.email));
    expect(rows).toEqual([{ role: a.role }]);
    const agent = await signIn(h.app, a.email, a.password);
    expect((await agent.get('/api/me')).body.role).toBe(a.role);
  }
});
