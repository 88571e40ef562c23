import { and, asc, eq, max } from 'drizzle-orm';
import { Router } from 'express';
import type { Db } from '@/db/client';
import { spec, user } from '@/db/schema';
import { parseSpec } from '@/lib/quality';
import { specSaveSchema } from '@/lib/schemas/quality';
import { HttpError } from '@/server/errors';
import { callerOf, requirePermission } from '@/server/permissions';
import { describeChanges, latestSpecs, loadSpec } from '@/server/services/quality';
import type { SpecRow } from '@/server/services/quality';
import { validate } from '@/server/validate';

export function specJson(r: SpecRow, extra: Record<string, unknown> = {}) {
  return { ...parseSpec(r.body), id: r.id, familyId: r.familyId, version: r.version, name: r.name, changes: r.changes, createdBy: r.createdBy, createdAt: r.createdAt, ...extra };
}

/** /api/specs — versioned acceptance specs: QA leads write, everyone reads. */
export function specsRouter(db: Db): Router {
  const r = Router();

  /** GET /api/specs — the newest version of each spec. */
  r.get('/', requirePermission('spec:read'), async (req, res) => {
    const c = callerOf(req);
    res.json({ specs: (await latestSpecs(db, c.organization.id)).map((s) => specJson(s)) });
  });

  /** GET /api/specs/:id — one version, with every version of its family (who changed what, when). */
  r.get('/:id', requirePermission('spec:read'), async (req, res) => {
    const c = callerOf(req);
    const { row } = await loadSpec(db, c.organization.id, String(req.params.id));
    const versions = await db
      .select({ id: spec.id, version: spec.version, changes: spec.changes, createdAt: spec.createdAt, by: user.name })
      .from(spec)
      .leftJoin(user, eq(user.id, spec.createdBy))
      .where(eq(spec.familyId, row.familyId))
      .orderBy(asc(spec.version));
    res.json(specJson(row, { versions }));
  });

  /**
   * POST /api/specs { name, limits: { <key>: { min?, max? } }, powerClasses?, failFlags?, notes?, familyId? }
   * — saves a new spec (version 1) or, with familyId, the next version of that spec. Returns it with id and version.
   */
  r.post('/', requirePermission('spec:write'), validate(specSaveSchema), async (req, res) => {
    const c = callerOf(req);
    const { familyId: requested, ...body } = req.body as ReturnType<typeof specSaveSchema.parse>;
    const parsed = parseSpec(body);
    const row = await db.transaction(async (tx) => {
      let familyId: string = crypto.randomUUID();
      let version = 1;
      let previous = null;
      if (requested) {
        const [last] = await tx
          .select()
          .from(spec)
          .where(and(eq(spec.familyId, requested), eq(spec.organizationId, c.organization.id)))
          .orderBy(asc(spec.version));
        if (!last) throw new HttpError(404, 'not_found', 'That spec was not found.');
        const [{ v }] = await tx.select({ v: max(spec.version) }).from(spec).where(eq(spec.familyId, requested));
        const [newest] = await tx.select().from(spec).where(and(eq(spec.familyId, requested), eq(spec.version, v!)));
        familyId = requested;
        version = (v ?? 0) + 1;
        previous = parseSpec(newest.body);
      }
      const [saved] = await tx
        .insert(spec)
        .values({ id: crypto.randomUUID(), organizationId: c.organization.id, familyId, version, name: parsed.name, body: parsed as unknown as Record<string, unknown>, changes: describeChanges(previous, parsed), createdBy: c.user.id })
        .returning();
      return saved;
    });
    res.status(201).json(specJson(row));
  });
  return r;
}
