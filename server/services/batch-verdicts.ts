/**
 * What a batch's pages say about each device: its worst severity (pass, warn, fail) and, when the
 * batch's spec fails it, the spec's reasons. The batch's spec is that of its last review decision
 * (the one a QA lead judged it by); without one the flags' own severities decide
 * (lib/quality/severity.ts). The batch table, its device cards and the overlay chart read it, so
 * the colours, the words and the counts agree. Results are cached with the answers that carry
 * them (per batch revision; a decision touches the batch).
 */
import { and, desc, eq, isNotNull } from 'drizzle-orm';
import type { Db } from '@/db/client';
import { batchReview } from '@/db/schema';
import { evaluateDevice } from '@/lib/quality/evaluate';
import type { DeviceEvaluation } from '@/lib/quality/evaluate';
import { deviceSeverity } from '@/lib/quality/severity';
import type { Severity } from '@/lib/quality/severity';
import type { Spec } from '@/lib/quality/spec';
import { deviceRecordsOfCurves } from '@/server/services/quality';
import { loadSpec } from '@/server/services/specs';
import type { BatchRow } from '@/server/services/batches';
import { judgedDevices } from '@/server/services/setups';

export type BatchSpec = { spec: Spec; info: { id: string; name: string; version: number } };
export type Verdict = { severity: Severity; reasons: string[] };

/** The spec of the batch's last review decision, or null when none was decided with one. */
export async function batchSpec(db: Db, organizationId: string, batchId: string): Promise<BatchSpec | null> {
  const [last] = await db
    .select({ specId: batchReview.specId })
    .from(batchReview)
    .where(and(eq(batchReview.batchId, batchId), isNotNull(batchReview.specId)))
    .orderBy(desc(batchReview.createdAt))
    .limit(1);
  if (!last?.specId) return null;
  const { row, spec } = await loadSpec(db, organizationId, last.specId);
  return { spec, info: { id: row.id, name: row.name, version: row.version } };
}

/** Each curve's verdict, by curve id: the spec's (when given) and the flags' severities combined. */
export async function curveVerdicts(db: Db, spec: BatchSpec | null, curves: readonly { id: string; flags: readonly { severity: string }[] }[], b?: BatchRow): Promise<Map<string, Verdict>> {
  const judged = new Map<string, DeviceEvaluation>();
  if (spec && curves.length) {
    const records = await deviceRecordsOfCurves(db, curves.map((c) => c.id));
    // With the batch's setup uncertainty and nameplate, so the pages say what the review says.
    for (const d of b ? await judgedDevices(db, b, records) : records) judged.set(d.curve_id, evaluateDevice(d, spec.spec));
  }
  return new Map(
    curves.map((c) => {
      const e = judged.get(c.id);
      return [c.id, { severity: deviceSeverity(c.flags, e?.result ?? null), reasons: e ? e.reasons.map((r) => r.message) : [] }];
    }),
  );
}
