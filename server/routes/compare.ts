import { and, eq, inArray } from 'drizzle-orm';
import { Router } from 'express';
import type { Db } from '@/db/client';
import { batch } from '@/db/schema';
import { describe as describeValues, evaluateBatch, isParamKey, tableOfRows, welchDifference } from '@/lib/quality';
import type { CompareRowInput, Description, ParamKey, Spec } from '@/lib/quality';
import { PARAM_KEYS, PARAM_UNITS } from '@/lib/quality/params';
import { compareQuerySchema } from '@/lib/schemas/quality';
import { HttpError } from '@/server/errors';
import { callerOf, requirePermission } from '@/server/permissions';
import { AnswerCache, batchKey, sendAnswer } from '@/server/services/answer-cache';
import { deviceRecords, loadSpec } from '@/server/services/quality';

type Records = Awaited<ReturnType<typeof deviceRecords>>;

/** /api/compare — several batches side by side for the comparison grid. */
export function compareRouter(db: Db): Router {
  const r = Router();
  // Device records per batch, kept while the batch's updatedAt stays the same (every upload,
  // replacement, refit and edit moves it): a designer flipping columns and parameters re-reads
  // 10,000 curves otherwise. Bounded; the oldest entry goes first.
  const cache = new Map<string, { stamp: number; rows: Records }>();
  const CACHE_BATCHES = 40;
  // Whole answers as sent, for the same batches in the same state (see answer-cache.ts).
  const answers = new AnswerCache(128 * 1024 * 1024);
  async function recordsOf(batches: { id: string; updatedAt: Date }[]): Promise<Records> {
    const missing = batches.filter((b) => cache.get(b.id)?.stamp !== +b.updatedAt);
    if (missing.length) {
      const fresh = await deviceRecords(db, missing.map((b) => b.id));
      for (const b of missing) {
        cache.delete(b.id);
        cache.set(b.id, { stamp: +b.updatedAt, rows: fresh.filter((d) => d.batchId === b.id) });
      }
      while (cache.size > CACHE_BATCHES) cache.delete(cache.keys().next().value!);
    }
    return batches.flatMap((b) => cache.get(b.id)!.rows);
  }

  /**
   * GET /api/compare?batches=a,b,…&spec=<specId>&param=pmp_w — one row per curve with every key
   * figure and fitted parameter (and pass/fail when a spec is given), sent as columns (`table`),
   * statistics per batch and parameter (Cpk against the spec's limits), and the Welch difference
   * of means of `param` between each batch and the first.
   */
  r.get('/', requirePermission('batch:read'), async (req, res) => {
    const c = callerOf(req);
    const q = compareQuerySchema.parse(req.query);
    if (!isParamKey(q.param)) throw new HttpError(400, 'invalid_input', `param must be one of ${PARAM_KEYS.join(', ')}.`);
    const param = q.param as ParamKey;
    const found = await db.select().from(batch).where(and(inArray(batch.id, q.batches), eq(batch.organizationId, c.organization.id)));
    if (found.length !== q.batches.length) throw new HttpError(404, 'not_found', 'One or more of those batches were not found.');
    const order = new Map(q.batches.map((id, k) => [id, k]));
    found.sort((a, b) => order.get(a.id)! - order.get(b.id)!);
    let spec: Spec | null = null;
    let specInfo = null;
    if (q.spec) {
      const s = await loadSpec(db, c.organization.id, q.spec);
      spec = s.spec;
      specInfo = { id: s.row.id, name: s.row.name, version: s.row.version };
    }
    // One answer per state of the chosen batches (their revisions), spec version and parameter.
    const key = `${found.map((b) => batchKey(b, '')).join(',')}|${specInfo?.id ?? ''}|${param}`;
    const body = await answers.get(key, async () => {
      const devices = await recordsOf(found);
      const byBatch = new Map<string, typeof devices>();
      for (const d of devices) {
        const list = byBatch.get(d.batchId);
        if (list) list.push(d);
        else byBatch.set(d.batchId, [d]);
      }

      const rows: CompareRowInput[] = [];
      const stats: Record<string, Partial<Record<ParamKey, Description | null>>> = {};
      const counts: Record<string, { total: number; pass: number; fail: number; outliers: number } | null> = {};
      found.forEach((b, bi) => {
        const list = byBatch.get(b.id) ?? [];
        if (spec) {
          const e = evaluateBatch(list, spec, { outlierParams: [param] });
          stats[b.id] = e.stats;
          counts[b.id] = e.counts;
          e.devices.forEach((d, k) =>
            rows.push({ curveId: list[k].curveId, batch: bi, deviceId: d.deviceId, values: d.values, flags: d.flags, result: d.result, reasons: d.reasons.map((x) => x.message), powerClass: d.powerClass, outlier: d.outlier }),
          );
        } else {
          const s: Partial<Record<ParamKey, Description | null>> = {};
          for (const k of PARAM_KEYS) {
            const v = list.map((d) => d.values[k]).filter((x): x is number => typeof x === 'number' && Number.isFinite(x));
            s[k] = v.length ? describeValues(v) : null;
          }
          stats[b.id] = s;
          counts[b.id] = null;
          for (const d of list) rows.push({ curveId: d.curveId, batch: bi, deviceId: d.deviceId, values: d.values, flags: d.flags, result: null, reasons: [], powerClass: null, outlier: null });
        }
      });

      const values = (id: string) => (byBatch.get(id) ?? []).map((d) => d.values[param]).filter((x): x is number => typeof x === 'number' && Number.isFinite(x));
      const first = found[0];
      const differences = found.slice(1).map((b) => {
        const a = values(first.id);
        const bb = values(b.id);
        try {
          return { batchA: first.id, batchB: b.id, param, ...welchDifference(a, bb, 0.95, { nameA: first.name, nameB: b.name, param, unit: PARAM_UNITS[param] }) };
        } catch (err) {
          return { batchA: first.id, batchB: b.id, param, error: (err as Error).message };
        }
      });

      return {
        batches: found.map((b) => ({ id: b.id, name: b.name, state: b.state, count: byBatch.get(b.id)?.length ?? 0 })),
        spec: specInfo,
        param,
        // The rows as columns (lib/quality/compare-table.ts); rowsOfTable gives them back.
        table: tableOfRows(rows),
        stats,
        counts,
        differences,
      };
    });
    sendAnswer(res, body);
  });
  return r;
}
