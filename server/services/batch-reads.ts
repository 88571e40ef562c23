/**
 * The read answers about batches (list, summary, curve pages, overlay), serialized and cached per
 * batch revision (see answer-cache.ts), so many people reading one batch cost one computation.
 */
import { and, asc, count, desc, eq, ilike, inArray, max, sql } from 'drizzle-orm';
import { LRUCache } from 'lru-cache';
import type { Db } from '@/db/client';
import { batch, curve } from '@/db/schema';
import { describe as describeValues } from '@/lib/quality';
import type { curveListQuerySchema } from '@/lib/schemas/curves';
import { AnswerCache, batchKey } from '@/server/services/answer-cache';
import { batchJson, loadBatch } from '@/server/services/batches';
import { batchSpec, curveVerdicts } from '@/server/services/batch-verdicts';
import type { BatchRow } from '@/server/services/batches';
import { curveJson, curveListColumns, fitsFor } from '@/server/services/curves';

type CurveListQuery = ReturnType<typeof curveListQuerySchema.parse>;

const SORT_COLUMNS = {
  device_id: curve.deviceId,
  isc_a: curve.isc_a,
  voc_v: curve.voc_v,
  pmp_w: curve.pmp_w,
  ff: curve.ff,
  n: curve.n,
  rs_ohm: curve.rs_ohm,
  rsh_ohm: curve.rsh_ohm,
  stc_pmp_w: curve.stc_pmp_w,
  created_at: curve.createdAt,
} as const;

type Aggregate = { curves: number; meanPmp: number | null };

/**
 * The read answers about batches, as serialized JSON, with their caches (one set per app).
 * Every method takes the caller's organisation and answers 404 for another's batch.
 */
export function batchReads(db: Db, answers = new AnswerCache()) {
  // Curve count and mean Pmax per batch revision: while uploads go on, only the batches that
  // changed are counted again. Filled only inside the list's computation, which concurrent
  // requests already share, so a bulk query for the missing ones is enough.
  const aggregates = new LRUCache<string, Aggregate>({ max: 10_000 });

  /** The organisation's batches with their curve counts and mean Pmax, newest first. */
  async function list(organizationId: string): Promise<Buffer> {
    // The organisation's batches in one state: their number and latest change name it.
    const [rev] = await db.select({ n: count(), last: max(batch.updatedAt) }).from(batch).where(eq(batch.organizationId, organizationId));
    return answers.get(`org:${organizationId}@${rev.n}/${rev.last?.getTime() ?? 0}:list`, async () => {
      const rows = await db.select().from(batch).where(eq(batch.organizationId, organizationId)).orderBy(desc(batch.createdAt));
      const found = new Map<string, Aggregate>();
      const changed: BatchRow[] = [];
      for (const b of rows) {
        const a = aggregates.get(batchKey(b, 'aggregate'));
        if (a) found.set(b.id, a);
        else changed.push(b);
      }
      if (changed.length) {
        // The mean summed exactly (numeric): a float sum's last digits depend on the order the rows come in.
        const fresh = await db
          .select({ id: curve.batchId, curves: sql<number>`count(*)::int`, meanPmp: sql<number | null>`avg(${curve.pmp_w}::numeric)::float8` })
          .from(curve)
          .where(inArray(curve.batchId, changed.map((b) => b.id)))
          .groupBy(curve.batchId);
        const byId = new Map(fresh.map((f) => [f.id, f]));
        for (const b of changed) {
          const f = byId.get(b.id);
          const a = { curves: f?.curves ?? 0, meanPmp: f?.meanPmp == null ? null : Number(f.meanPmp) };
          aggregates.set(batchKey(b, 'aggregate'), a);
          found.set(b.id, a);
        }
      }
      return { batches: rows.map((b) => batchJson(b, { curve_count: found.get(b.id)!.curves, mean_pmp_w: found.get(b.id)!.meanPmp })) };
    });
  }

  /** One batch with its curve count, the statistics of its key figures and its flag counts. */
  async function summary(organizationId: string, id: string): Promise<Buffer> {
    const b = await loadBatch(db, organizationId, id);
    return answers.get(batchKey(b, 'summary'), async () => {
      const rows = await db
        .select({ isc: curve.isc_a, voc: curve.voc_v, pmp: curve.pmp_w, ff: curve.ff, n: curve.n, rs: curve.rs_ohm, rsh: curve.rsh_ohm, stc: curve.stc_pmp_w, flags: curve.flagCodes })
        .from(curve)
        .where(eq(curve.batchId, b.id))
        // In one order: a floating-point sum depends on it, and every server process must give the same digits.
        .orderBy(asc(curve.id));
      const pick = (k: keyof (typeof rows)[number]) => rows.map((x) => x[k]).filter((v): v is number => typeof v === 'number' && Number.isFinite(v));
      const stats: Record<string, ReturnType<typeof describeValues> | null> = {};
      for (const [key, col] of [['isc_a', 'isc'], ['voc_v', 'voc'], ['pmp_w', 'pmp'], ['ff', 'ff'], ['n', 'n'], ['rs_ohm', 'rs'], ['rsh_ohm', 'rsh'], ['stc_pmp_w', 'stc']] as const) {
        const v = pick(col);
        stats[key] = v.length ? describeValues(v) : null;
      }
      const flag_counts: Record<string, number> = {};
      for (const x of rows) for (const f of x.flags.split(' ').filter(Boolean)) flag_counts[f] = (flag_counts[f] ?? 0) + 1;
      return batchJson(b, { curve_count: rows.length, summary: stats, flag_counts });
    });
  }

  /** One page of the batch table, sorted and searched in the database. */
  async function curvePage(organizationId: string, id: string, q: CurveListQuery): Promise<Buffer> {
    const b = await loadBatch(db, organizationId, id);
    return answers.get(batchKey(b, `curves:${JSON.stringify(q)}`), async () => {
      const sortCol = SORT_COLUMNS[q.sort];
      const conds = [eq(curve.batchId, b.id)];
      if (q.q) conds.push(ilike(curve.deviceId, `%${q.q.replace(/[\\%_]/g, (m) => '\\' + m)}%`));
      if (q.flag) conds.push(sql`(' ' || ${curve.flagCodes} || ' ') like ${'% ' + q.flag + ' %'}`);
      const where = and(...conds);
      const [{ total }] = await db.select({ total: count() }).from(curve).where(where);
      const rows = await db
        .select(curveListColumns)
        .from(curve)
        .where(where)
        .orderBy(q.dir === 'asc' ? sql`${sortCol} asc nulls last` : sql`${sortCol} desc nulls last`, asc(curve.id))
        .limit(q.page_size)
        .offset((q.page - 1) * q.page_size);
      const fits = await fitsFor(db, rows.map((x) => x.id), true, false);
      const spec = await batchSpec(db, organizationId, b.id);
      const verdicts = await curveVerdicts(db, spec, rows, b);
      return {
        curves: rows.map((x) => ({ ...curveJson(x, fits.get(x.id) ?? [], false), ...verdicts.get(x.id)! })),
        total,
        page: q.page,
        page_size: q.page_size,
        spec: spec?.info ?? null,
      };
    });
  }

  /**
   * A sample of at most `most` of the batch's curves (evenly by device id), each thinned to ~80
   * points for one chart, with its worst severity (batch-verdicts.ts) for the chart's colours.
   */
  async function overlay(organizationId: string, id: string, most: number): Promise<Buffer> {
    const b = await loadBatch(db, organizationId, id);
    return answers.get(batchKey(b, `overlay:${most}`), async () => {
      const ids = await db.select({ id: curve.id }).from(curve).where(eq(curve.batchId, b.id)).orderBy(asc(curve.deviceId));
      const step = Math.max(1, ids.length / most);
      const chosen = Array.from({ length: Math.min(most, ids.length) }, (_, k) => ids[Math.floor(k * step)].id);
      const rows = chosen.length
        ? await db
            .select({ id: curve.id, deviceId: curve.deviceId, v: curve.voltage_v, i: curve.current_a, flags: curve.flags })
            .from(curve)
            .where(sql`${curve.id} in ${chosen}`)
        : [];
      const thin = (arr: number[], k: number) => arr.filter((_, idx) => idx % k === 0 || idx === arr.length - 1);
      const spec = await batchSpec(db, organizationId, b.id);
      const verdicts = await curveVerdicts(db, spec, rows, b);
      return {
        total: ids.length,
        sampled: rows.length,
        spec: spec?.info ?? null,
        curves: rows.map((x) => {
          const k = Math.max(1, Math.ceil(x.v.length / 80));
          return { id: x.id, device_id: x.deviceId, severity: verdicts.get(x.id)!.severity, voltage_v: thin(x.v, k), current_a: thin(x.i, k) };
        }),
      };
    });
  }

  return { list, summary, curvePage, overlay };
}

export type BatchReads = ReturnType<typeof batchReads>;
