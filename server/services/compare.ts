/**
 * The comparison of several batches side by side: one row per curve with every key figure and
 * fitted parameter (and pass/fail against a spec), sent per batch as columns, with statistics per
 * batch and the Welch difference of means between each batch and the first. Everything is kept
 * per batch revision (see answer-cache.ts): a designer flipping columns and parameters would
 * re-read 10,000 curves otherwise.
 */
import { and, eq, inArray } from 'drizzle-orm';
import { LRUCache } from 'lru-cache';
import type { Db } from '@/db/client';
import { batch } from '@/db/schema';
import { columnsOfRows, describe as describeValues, evaluateBatch, isParamKey, robustZOn, welchDifference } from '@/lib/quality';
import type { CompareRowInput, Description, ParamKey, Spec } from '@/lib/quality';
import { comparisonCsv, comparisonFileName } from '@/lib/quality/compare-csv';
import { rowsOfColumns } from '@/lib/quality/compare-table';
import { batchKind, compareKinds, perCellLabel, perCellValues } from '@/lib/quality/compare-kinds';
import type { BatchKind } from '@/lib/quality/compare-kinds';
import { PARAM_KEYS } from '@/lib/quality/params';
import type { ComparisonWire } from '@/lib/schemas/responses';
import type { compareQuerySchema } from '@/lib/schemas/quality';
import { labelOf } from '@/lib/vocabulary';
import { HttpError } from '@/server/errors';
import { AnswerCache, batchKey } from '@/server/services/answer-cache';
import { deviceRecords } from '@/server/services/quality';
import type { DeviceRow } from '@/server/services/quality';
import { loadSpec } from '@/server/services/specs';
import { judgedDevices } from '@/server/services/setups';
import type { BatchRow } from '@/server/services/batches';
import { ruleOf } from '@/lib/quality/decision-rules';
import { uncertaintyByKey } from '@/lib/quality/uncertainty';

type CompareQuery = ReturnType<typeof compareQuerySchema.parse>;

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
    const e = evaluateBatch(list, spec, { outlier_params: [] });
    const rows: CompareRowInput[] = e.devices.map((d, k) => ({ curve_id: list[k].curve_id, device_id: d.device_id, cells: list[k].cells, values: { ...d.values, ...uncertaintyByKey(d.uncertainty) }, flags: d.flags, result: d.result, reasons: d.reasons.map((x) => x.message), power_class: d.power_class }));
    return { json: Buffer.from(JSON.stringify(columnsOfRows(rows))), stats: e.stats, counts: { total: e.counts.total, pass: e.counts.pass, fail: e.counts.fail }, outliers: { list, byParam: new Map() } };
  }
  const rows: CompareRowInput[] = list.map((d) => ({ curve_id: d.curve_id, device_id: d.device_id, cells: d.cells, values: { ...d.values, ...uncertaintyByKey(d.uncertainty) }, flags: d.flags, result: null, reasons: [], power_class: null }));
  const columns = columnsOfRows(rows);
  const stats: Partial<Record<ParamKey, Description | null>> = {};
  for (const k of PARAM_KEYS) {
    // The columns hold finite numbers or null already.
    const v = (columns.values[k] ?? []).filter((x): x is number => x !== null);
    stats[k] = v.length ? describeValues(v) : null;
  }
  return { json: Buffer.from(JSON.stringify(columns)), stats, counts: null, outliers: null };
}

/** The comparison with its caches (one set per app). */
export function comparisons(db: Db) {
  // Device records per batch revision; concurrent misses of one batch read it once.
  // Each with its figures' expanded uncertainty from the batch's setup and the batch's nameplate (server/services/setups.ts).
  const records = new LRUCache<string, DeviceRow[], BatchRow>({
    max: 40,
    fetchMethod: async (_key, _stale, { context: b }) => judgedDevices(db, b, await deviceRecords(db, [b.id])),
  });
  // Each batch's part per (batch revision, spec version); computed synchronously, so memo suffices.
  const parts = new LRUCache<string, BatchPart, { list: DeviceRow[]; spec: Spec | null }>({
    max: 80,
    memoMethod: (_key, _stale, { context }) => batchPart(context.list, context.spec),
  });
  // Whole answers as sent.
  const answers = new AnswerCache(128 * 1024 * 1024);

  /** The comparison answer, serialized; 404 when a batch or the spec is not the organisation's. */
  async function compare(organizationId: string, q: CompareQuery): Promise<Buffer> {
    if (!isParamKey(q.param)) throw new HttpError(400, 'invalid_input', `param must be one of ${PARAM_KEYS.join(', ')}.`);
    const param = q.param as ParamKey;
    const found = await db.select().from(batch).where(and(inArray(batch.id, q.batches), eq(batch.organizationId, organizationId)));
    if (found.length !== q.batches.length) throw new HttpError(404, 'not_found', 'One or more of those batches were not found.');
    const order = new Map(q.batches.map((id, k) => [id, k]));
    found.sort((a, b) => order.get(a.id)! - order.get(b.id)!);
    let spec: Spec | null = null;
    let specInfo = null;
    if (q.spec) {
      const s = await loadSpec(db, organizationId, q.spec);
      spec = s.spec;
      specInfo = { id: s.row.id, name: s.row.name, version: s.row.version, decision_rule: ruleOf(s.spec) };
    }

    // One answer per state of the chosen batches (their revisions), spec version and parameter.
    const key = `${found.map((b) => batchKey(b, '')).join(',')}|${specInfo?.id ?? ''}|${param}`;
    return answers.get(key, async () => {
      const lists = await Promise.all(found.map(async (b) => (await records.fetch(batchKey(b, ''), { context: b })) ?? []));
      const byBatch = new Map(found.map((b, k) => [b.id, lists[k]]));
      const chosen = found.map((b, k) => parts.memo(batchKey(b, specInfo?.id ?? ''), { context: { list: lists[k], spec } }));

      const stats: Record<string, Partial<Record<ParamKey, Description | null>>> = {};
      const counts: Record<string, { total: number; pass: number; fail: number; outliers: number } | null> = {};
      const outliers = found.map((b, k) => {
        const part = chosen[k];
        stats[b.id] = part.stats;
        if (!part.counts || !part.outliers) {
          counts[b.id] = null;
          return new Array<null>(lists[k].length).fill(null);
        }
        let marks = part.outliers.byParam.get(param);
        if (!marks) {
          marks = robustZOn(part.outliers.list, param).map((m) => m.outlier);
          part.outliers.byParam.set(param, marks);
        }
        counts[b.id] = { ...part.counts, outliers: marks.filter(Boolean).length };
        return marks;
      });

      // Different kinds of devices (cells against modules, other cell counts): per cell, or no
      // t-test, with the reason (lib/quality/compare-kinds.ts). Each pair is judged on its own.
      const names = new Map(found.map((b) => [b.id, b.name]));
      const kindOf = new Map<string, BatchKind>(found.map((b, k) => [b.id, batchKind(b.id, lists[k])]));
      const kinds = compareKinds([...kindOf.values()], param, names, byBatch);
      const values = (id: string) => (byBatch.get(id) ?? []).map((d) => d.values[param]).filter((x): x is number => typeof x === 'number' && Number.isFinite(x));
      const first = found[0];
      const differences = found.slice(1).map((b) => {
        const pair = compareKinds([kindOf.get(first.id)!, kindOf.get(b.id)!], param, names, byBatch);
        if (pair.basis === 'refused') return { batch_a: first.id, batch_b: b.id, param, basis: pair.basis, error: pair.note ?? 'these batches cannot be compared on this figure' };
        const perCell = pair.basis === 'per_cell';
        const a = perCell ? perCellValues(byBatch.get(first.id) ?? [], param) : values(first.id);
        const bb = perCell ? perCellValues(byBatch.get(b.id) ?? [], param) : values(b.id);
        try {
          return { batch_a: first.id, batch_b: b.id, param, basis: pair.basis, ...welchDifference(a, bb, 0.95, { nameA: first.name, nameB: b.name, key: param, ...(perCell ? { param: perCellLabel(param) } : {}) }) };
        } catch (err) {
          return { batch_a: first.id, batch_b: b.id, param, basis: pair.basis, error: (err as Error).message };
        }
      });

      const head = JSON.stringify({
        batches: found.map((b, k) => ({ id: b.id, name: b.name, state: b.state, count: lists[k].length })),
        spec: specInfo,
        param,
        outliers,
        stats,
        counts,
        differences,
        kinds,
      });
      // The batches' columns are spliced in as serialized: `…, "tables": [part, part, …]}`.
      const pieces: Buffer[] = [Buffer.from(head.slice(0, -1) + ',"tables":[')];
      chosen.forEach((part, k) => pieces.push(...(k ? [Buffer.from(','), part.json] : [part.json])));
      pieces.push(Buffer.from(']}'));
      return Buffer.concat(pieces);
    });
  }

  /**
   * The comparison as a CSV file (lib/quality/compare-csv.ts): every curve of the chosen batches
   * with every column of the grid, made from the cached answer. The screen downloads the view it
   * shows (its filter, sort and columns) with the same writer.
   */
  async function compareCsv(organizationId: string, q: CompareQuery): Promise<{ fileName: string; text: string }> {
    const wire = JSON.parse((await compare(organizationId, q)).toString('utf8')) as ComparisonWire;
    const exportedAt = new Date();
    const text = comparisonCsv({ rows: rowsOfColumns(wire.tables, wire.outliers, wire.batches), batches: wire.batches, spec: wire.spec, exportedAt });
    return { fileName: comparisonFileName(exportedAt), text };
  }

  return { compare, compareCsv };
}
