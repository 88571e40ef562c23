import { and, eq, inArray } from 'drizzle-orm';
import { Router } from 'express';
import type { Db } from '@/db/client';
import { batch } from '@/db/schema';
import { columnsOfRows, describe as describeValues, evaluateBatch, isParamKey, robustZOn, welchDifference } from '@/lib/quality';
import type { CompareRowInput, Description, ParamKey, Spec } from '@/lib/quality';
import { PARAM_KEYS, PARAM_UNITS } from '@/lib/quality/params';
import { compareQuerySchema } from '@/lib/schemas/quality';
import { HttpError } from '@/server/errors';
import { callerOf, requirePermission } from '@/server/permissions';
import { AnswerCache, batchKey, sendAnswer } from '@/server/services/answer-cache';
import { deviceRecords, loadSpec } from '@/server/services/quality';
import type { DeviceRow } from '@/server/services/quality';

type Records = Awaited<ReturnType<typeof deviceRecords>>;

/** One batch's part of a comparison, kept while the batch is unchanged (for one spec version). */
type BatchPart = {
  /** The batch's rows as columns (lib/quality/compare-table.ts), serialized. */
  json: Buffer;
  stats: Partial<Record<ParamKey, Description | null>>;
  counts: { total: number; pass: number; fail: number } | null;
  /** With a spec: the devices (to mark outliers on a parameter) and the marks made so far. */
  outliers: { list: DeviceRow[]; byParam: Map<ParamKey, boolean[]> } | null;
};

/** A batch's part: its rows as columns and statistics, and with a spec the pass/fail evaluation (outliers are marked later, per parameter). */
function batchPart(list: DeviceRow[], spec: Spec | null): BatchPart {
  if (spec) {
    // Outliers depend on the parameter chosen: marked per request with robustZOn and kept in the part.
    const e = evaluateBatch(list, spec, { outlierParams: [] });
    const rows: CompareRowInput[] = e.devices.map((d, k) => ({ curveId: list[k].curveId, deviceId: d.deviceId, values: d.values, flags: d.flags, result: d.result, reasons: d.reasons.map((x) => x.message), powerClass: d.powerClass }));
    return { json: Buffer.from(JSON.stringify(columnsOfRows(rows))), stats: e.stats, counts: { total: e.counts.total, pass: e.counts.pass, fail: e.counts.fail }, outliers: { list, byParam: new Map() } };
  }
  const rows: CompareRowInput[] = list.map((d) => ({ curveId: d.curveId, deviceId: d.deviceId, values: d.values, flags: d.flags, result: null, reasons: [], powerClass: null }));
  const columns = columnsOfRows(rows);
  const stats: Partial<Record<ParamKey, Description | null>> = {};
  for (const k of PARAM_KEYS) {
    // The columns hold finite numbers or null already.
    const v = (columns.values[k] ?? []).filter((x): x is number => x !== null);
    stats[k] = v.length ? describeValues(v) : null;
  }
  return { json: Buffer.from(JSON.stringify(columns)), stats, counts: null, outliers: null };
}

/** /api/compare — several batches side by side for the comparison grid. */
export function compareRouter(db: Db): Router {
  const r = Router();
  // Device records per batch, kept while the batch's revision stays the same (every upload,
  // replacement, refit and edit moves it, see answer-cache.ts): a designer flipping columns and
  // parameters re-reads 10,000 curves otherwise. Bounded; the oldest entry goes first.
  const cache = new Map<string, { stamp: number; rows: Records }>();
  const CACHE_BATCHES = 40;
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
  // Each batch's part per (batch revision, spec version), and whole answers as sent.
  const parts = new Map<string, BatchPart>();
  const PARTS = 80;
  const answers = new AnswerCache(128 * 1024 * 1024);

  /**
   * GET /api/compare?batches=a,b,…&spec=<specId>&param=pmp_w — one row per curve with every key
   * figure and fitted parameter (and pass/fail when a spec is given), sent per batch as columns
   * (`tables`, with `outliers` on `param` apart), statistics per batch and parameter (Cpk against
   * the spec's limits), and the Welch difference of means of `param` between each batch and the first.
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
      const byBatch = new Map<string, DeviceRow[]>();
      for (const d of devices) {
        const list = byBatch.get(d.batchId);
        if (list) list.push(d);
        else byBatch.set(d.batchId, [d]);
      }
      const chosen = found.map((b) => {
        const partKey = batchKey(b, specInfo?.id ?? '');
        let part = parts.get(partKey);
        if (!part) {
          part = batchPart(byBatch.get(b.id) ?? [], spec);
          parts.set(partKey, part);
          while (parts.size > PARTS) parts.delete(parts.keys().next().value!);
        }
        return part;
      });

      const stats: Record<string, Partial<Record<ParamKey, Description | null>>> = {};
      const counts: Record<string, { total: number; pass: number; fail: number; outliers: number } | null> = {};
      const outliers = found.map((b, k) => {
        const part = chosen[k];
        stats[b.id] = part.stats;
        if (!part.counts || !part.outliers) {
          counts[b.id] = null;
          return new Array<null>(byBatch.get(b.id)?.length ?? 0).fill(null);
        }
        let marks = part.outliers.byParam.get(param);
        if (!marks) {
          marks = robustZOn(part.outliers.list, param).map((m) => m.outlier);
          part.outliers.byParam.set(param, marks);
        }
        counts[b.id] = { ...part.counts, outliers: marks.filter(Boolean).length };
        return marks;
      });

      const values = (id: string) => (byBatch.get(id) ?? []).map((d) => d.values[param]).filter((x): x is number => typeof x === 'number' && Number.isFinite(x));
      const first = found[0];
      const a = values(first.id);
      const differences = found.slice(1).map((b) => {
        const bb = values(b.id);
        try {
          return { batchA: first.id, batchB: b.id, param, ...welchDifference(a, bb, 0.95, { nameA: first.name, nameB: b.name, param, unit: PARAM_UNITS[param] }) };
        } catch (err) {
          return { batchA: first.id, batchB: b.id, param, error: (err as Error).message };
        }
      });

      const head = JSON.stringify({
        batches: found.map((b) => ({ id: b.id, name: b.name, state: b.state, count: byBatch.get(b.id)?.length ?? 0 })),
        spec: specInfo,
        param,
        outliers,
        stats,
        counts,
        differences,
      });
      // The batches' columns are spliced in as serialized: `…, "tables": [part, part, …]}`.
      const pieces: Buffer[] = [Buffer.from(head.slice(0, -1) + ',"tables":[')];
      chosen.forEach((part, k) => pieces.push(...(k ? [Buffer.from(','), part.json] : [part.json])));
      pieces.push(Buffer.from(']}'));
      return Buffer.concat(pieces);
    });
    sendAnswer(res, body);
  });
  return r;
}
