/**
 * Versioned acceptance specs: reading one version or the newest of each family, and saving a
 * new version (numbered in the same transaction that reads the last one).
 */
import { and, asc, desc, eq, max } from 'drizzle-orm';
import type { Db } from '@/db/client';
import { spec, user } from '@/db/schema';
import { parseSpec } from '@/lib/quality';
import type { Spec } from '@/lib/quality';
import { describeChanges } from '@/lib/quality/spec-changes';
import type { specSaveSchema } from '@/lib/schemas/quality';
import { HttpError, notFound } from '@/server/errors';

export type SpecRow = typeof spec.$inferSelect;

/** One spec version of the organisation, parsed; 404 otherwise. */
export async function loadSpec(db: Db, organizationId: string, id: string): Promise<{ row: SpecRow; spec: Spec }> {
  const [row] = await db.select().from(spec).where(and(eq(spec.id, id), eq(spec.organizationId, organizationId)));
  if (!row) throw notFound('That spec');
  return { row, spec: parseSpec(row.body) };
}

/** The API shape of a spec version. */
export function specJson(r: SpecRow, extra: Record<string, unknown> = {}) {
  return { ...parseSpec(r.body), id: r.id, family_id: r.family_id, version: r.version, name: r.name, changes: r.changes, created_by: r.createdBy, created_at: r.createdAt, ...extra };
}

/** The newest version of every spec family of an organisation, by name. */
export async function latestSpecs(db: Db, organizationId: string): Promise<SpecRow[]> {
  const rows = await db.select().from(spec).where(eq(spec.organizationId, organizationId)).orderBy(desc(spec.version));
  const seen = new Set<string>();
  return rows.filter((r) => (seen.has(r.family_id) ? false : (seen.add(r.family_id), true))).sort((a, b) => a.name.localeCompare(b.name));
}

/** GET /api/specs: the newest versions as JSON. */
export async function listSpecs(db: Db, organizationId: string) {
  return { specs: (await latestSpecs(db, organizationId)).map((s) => specJson(s)) };
}

/** One version with every version of its family (who changed what, when). */
export async function specDetail(db: Db, organizationId: string, id: string) {
  const { row } = await loadSpec(db, organizationId, id);
  const versions = await db
    .select({ id: spec.id, version: spec.version, changes: spec.changes, created_at: spec.createdAt, by: user.name })
    .from(spec)
    .leftJoin(user, eq(user.id, spec.createdBy))
    .where(eq(spec.family_id, row.family_id))
    .orderBy(asc(spec.version));
  return specJson(row, { versions });
}

/**
 * Saves a new spec (version 1) or, with family_id, the next version of that family; 404 for
 * another organisation's family. `base_version` must be the family's newest version: otherwise
 * someone saved in between, and the answer is 409 `spec_conflict` with that newer version and
 * what changed from the base to it (lib/quality/spec-changes.ts), so the edit can be re-applied.
 */
export async function saveSpec(db: Db, who: { organizationId: string; userId: string }, input: ReturnType<typeof specSaveSchema.parse>) {
  const { family_id: requested, base_version: baseVersion, ...body } = input;
  const parsed = parseSpec(body);
  const row = await db.transaction(async (tx) => {
    let family_id: string = crypto.randomUUID();
    let version = 1;
    let previous: Spec | null = null;
    if (requested) {
      // The family's rows locked: a second save on the same base waits here, then finds the newer version.
      const [first] = await tx
        .select({ id: spec.id })
        .from(spec)
        .where(and(eq(spec.family_id, requested), eq(spec.organizationId, who.organizationId)))
        .for('update');
      if (!first) throw new HttpError(404, 'not_found', 'That spec was not found.');
      const [{ v }] = await tx.select({ v: max(spec.version) }).from(spec).where(eq(spec.family_id, requested));
      const [newest] = await tx.select().from(spec).where(and(eq(spec.family_id, requested), eq(spec.version, v!)));
      if (baseVersion !== newest.version) {
        const [base] = await tx.select().from(spec).where(and(eq(spec.family_id, requested), eq(spec.version, baseVersion ?? 0)));
        throw new HttpError(409, 'spec_conflict', `Version ${newest.version} of “${newest.name}” was saved after version ${baseVersion ?? '?'}, which this edit started from. Reload it and apply your changes again.`, undefined, {
          newer: { id: newest.id, version: newest.version, changes: describeChanges(base ? parseSpec(base.body) : null, parseSpec(newest.body)), spec: specJson(newest) },
        });
      }
      family_id = requested;
      version = (v ?? 0) + 1;
      previous = parseSpec(newest.body);
    }
    const [saved] = await tx
      .insert(spec)
      .values({ id: crypto.randomUUID(), organizationId: who.organizationId, family_id, version, name: parsed.name, body: parsed as unknown as Record<string, unknown>, changes: describeChanges(previous, parsed), createdBy: who.userId })
      .returning();
    return saved;
  });
  return specJson(row);
}
