/**
 * First-start seed: the demo organisation and one account per role from sample-data/.
 * Idempotent: does nothing when the demo organisation's domain is already present.
 */
import { readFileSync } from 'node:fs';
import path from 'node:path';
import { and, eq } from 'drizzle-orm';
import { z } from 'zod';
import type { Db } from '@/db/client';
import { member, organization, user } from '@/db/schema';
import { ROLES } from '@/lib/auth/roles';
import type { Auth } from '@/server/auth';

export const SAMPLE_DIR = path.resolve(__dirname, '..', 'sample-data');

const accountsSchema = z.array(
  z.object({ email: z.email(), password: z.string().min(8), role: z.enum(ROLES), name: z.string().min(1) }),
);
const orgSchema = z.object({ name: z.string(), domain: z.string(), about: z.string().optional() });

export type DemoAccount = z.infer<typeof accountsSchema>[number];

export function readDemoAccounts(dir = SAMPLE_DIR): DemoAccount[] {
  return accountsSchema.parse(JSON.parse(readFileSync(path.join(dir, 'demo-accounts.json'), 'utf8')));
}

export function readDemoOrganisation(dir = SAMPLE_DIR) {
  return orgSchema.parse(JSON.parse(readFileSync(path.join(dir, 'organisation.json'), 'utf8')));
}

/** Seeds the demo organisation and accounts; returns false when it was already there. */
export async function seedDemo(db: Db, auth: Auth, dir = SAMPLE_DIR): Promise<boolean> {
  const org = readDemoOrganisation(dir);
  const [existing] = await db.select().from(organization).where(eq(organization.domain, org.domain));
  if (existing) return false;
  const accounts = readDemoAccounts(dir);
  // The admin signs up first so that the domain's organisation is founded with an admin.
  const ordered = [...accounts].sort((a, b) => Number(b.role === 'admin') - Number(a.role === 'admin'));
  for (const a of ordered) {
    await auth.api.signUpEmail({ body: { email: a.email, password: a.password, name: a.name } });
  }
  const [created] = await db.select().from(organization).where(eq(organization.domain, org.domain));
  if (!created) throw new Error(`seed: organisation for ${org.domain} was not created`);
  await db.update(organization).set({ name: org.name, metadata: JSON.stringify({ demo: true, about: org.about }) }).where(eq(organization.id, created.id));
  for (const a of accounts) {
    const [u] = await db.select().from(user).where(eq(user.email, a.email));
    await db.update(member).set({ role: a.role }).where(and(eq(member.userId, u.id), eq(member.organizationId, created.id)));
  }
  return true;
}
