/**
 * First-start seed: the demo organisation and one account per role from sample-data/.
 * Idempotent: does nothing when the demo organisation's domain is already present.
 */
import { readFileSync } from 'node:fs';
import path from 'node:path';
import { eq, inArray } from 'drizzle-orm';
import { z } from 'zod';
import type { Db } from '@/db/client';
import { batch, member, organization, user } from '@/db/schema';
import { analyseFile } from '@/lib/analysis/analyse-file';
import { ROLES } from '@/lib/auth/roles';
import type { Auth } from '@/server/auth';
import { batchDefaults } from '@/server/services/batches';
import { storeCurve } from '@/server/services/curves';

export const SAMPLE_DIR = path.resolve(__dirname, '..', '..', 'sample-data');

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

/**
 * Seeds the demo organisation and accounts, their addresses verified (nobody can open a mail
 * sent to an invented domain); returns false when it was already there. The accounts are made
 * through better-auth's own adapter and password hashing, without sign-up's mails and checks.
 */
export async function seedDemo(db: Db, auth: Auth, dir = SAMPLE_DIR): Promise<boolean> {
  const org = readDemoOrganisation(dir);
  const accounts = readDemoAccounts(dir);
  const [existing] = await db.select().from(organization).where(eq(organization.domain, org.domain));
  if (existing) {
    // Data made before addresses were verified: the demo accounts stay usable.
    await db.update(user).set({ emailVerified: true }).where(inArray(user.email, accounts.map((a) => a.email.toLowerCase())));
    return false;
  }
  const ctx = await auth.$context;
  const orgId = crypto.randomUUID();
  await db.insert(organization).values({
    id: orgId,
    name: org.name,
    slug: org.domain.replace(/[^a-z0-9]+/g, '-'),
    domain: org.domain,
    metadata: JSON.stringify({ demo: true, about: org.about }),
  });
  for (const a of accounts) {
    const u = await ctx.internalAdapter.createUser({ email: a.email.toLowerCase(), name: a.name, emailVerified: true }, { method: 'email-password' });
    await ctx.internalAdapter.linkAccount({ userId: u.id, providerId: 'credential', accountId: u.id, password: await ctx.password.hash(a.password) });
    await db.insert(member).values({ id: crypto.randomUUID(), organizationId: orgId, userId: u.id, role: a.role });
  }
  const engineer = accounts.find((a) => a.role === 'test_engineer');
  const [eng] = engineer ? await db.select().from(user).where(eq(user.email, engineer.email.toLowerCase())) : [];
  await seedDemoBatches(db, orgId, eng?.id ?? null, dir);
  return true;
}

const manifestSchema = z.array(
  z.object({
    slug: z.string(),
    name: z.string(),
    product_type: z.string().nullable().optional(),
    supplier: z.string().nullable().optional(),
    line: z.string().nullable().optional(),
    lot: z.string().nullable().optional(),
    batch_date: z.string().nullable().optional(),
    cells: z.number().int().nullable().optional(),
    area_cm2: z.number().nullable().optional(),
    nameplate_w: z.number().nullable().optional(),
    irradiance_w_m2: z.number().nullable().optional(),
    alpha_pct_per_k: z.number().nullable().optional(),
    beta_pct_per_k: z.number().nullable().optional(),
    gamma_pct_per_k: z.number().nullable().optional(),
    rs_ohm: z.number().nullable().optional(),
    kappa_ohm_per_k: z.number().nullable().optional(),
    description: z.string().nullable().optional(),
    files: z.array(z.string()),
  }),
);

/** Paths of the demo curve files (sample-data/batches/); the server's analysis threads warm up on them. */
export function demoCurveFiles(dir = SAMPLE_DIR): string[] {
  const root = path.join(dir, 'batches');
  try {
    const manifest = manifestSchema.parse(JSON.parse(readFileSync(path.join(root, 'manifest.json'), 'utf8')));
    return manifest.flatMap((m) => m.files.map((f) => path.join(root, m.slug, f)));
  } catch {
    return [];
  }
}

/** Loads sample-data/batches/ through the same analyse-and-store path as an upload. */
export async function seedDemoBatches(db: Db, organizationId: string, userId: string | null, dir = SAMPLE_DIR): Promise<number> {
  const root = path.join(dir, 'batches');
  const manifest = manifestSchema.parse(JSON.parse(readFileSync(path.join(root, 'manifest.json'), 'utf8')));
  let stored = 0;
  for (const m of manifest) {
    const { slug, files, ...fields } = m;
    const id = crypto.randomUUID();
    const [row] = await db.insert(batch).values({ id, organizationId, createdBy: userId, ...fields }).returning();
    const defaults = batchDefaults(row);
    for (const f of files) {
      const analysis = analyseFile(readFileSync(path.join(root, slug, f)), { fileName: f, defaults });
      await storeCurve(db, { organizationId, batchId: id, fileName: f, analysis, userId });
      stored++;
    }
  }
  return stored;
}
