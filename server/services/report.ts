/**
 * The release report of a batch (GET /api/batches/:id/report.pdf, the release mail's attachment):
 * gathers what it shows — batch facts, the spec version and its limits, counts, power classes,
 * every device's result and reasons, Pmax and FF against the limits, flags, who submitted and who
 * released when — and has server/services/report-pdf.ts draw it. A released batch (without ?spec or
 * with the release's spec) is reported from its frozen release record (server/services/releases.ts);
 * any other from an evaluation made now.
 */
import { and, desc, eq, inArray, lte } from 'drizzle-orm';
import type { Db } from '@/db/client';
import { batchReview, curve, user } from '@/db/schema';
import { flagCounts, histogram, limitLines, powerClassCounts, powerClassLines } from '@/lib/quality/report-model';
import type { ReportDevice } from '@/lib/quality/report-model';
import { HV_CAUTION } from '@/lib/strings/cautions';
import { loadBatch } from '@/server/services/batches';
import { latestRelease } from '@/server/services/releases';
import { renderReportPdf } from '@/server/services/report-pdf';
import type { ReportContent } from '@/server/services/report-pdf';
import { batchEvaluation } from '@/server/services/reviews';
import { loadSpec } from '@/server/services/specs';

type Frozen = { device_id: string; curve_id: string; result: 'pass' | 'fail'; reasons: string[]; power_class: string | null; figures: Record<string, number | null> };

/** Who did `action` last (before `until`, when given), and when. */
async function lastAction(db: Db, batchId: string, action: string, until?: Date) {
  const where = [eq(batchReview.batchId, batchId), eq(batchReview.action, action), ...(until ? [lte(batchReview.createdAt, until)] : [])];
  const [r] = await db.select({ name: user.name, at: batchReview.createdAt }).from(batchReview).leftJoin(user, eq(user.id, batchReview.actorId)).where(and(...where)).orderBy(desc(batchReview.createdAt)).limit(1);
  return r ? { name: r.name ?? 'a former member', at: r.at } : null;
}

/** The report's content for a batch of the organisation (404 for another's). */
export async function reportContent(db: Db, organizationId: string, batchId: string, specId?: string): Promise<ReportContent> {
  const b = await loadBatch(db, organizationId, batchId);
  const release = b.state === 'released' ? await latestRelease(db, b.id) : null;
  const frozen = release && (!specId || specId === release.specId) ? release : null;
  let devices: ReportDevice[];
  let curveIds: string[];
  let specRef: string;
  let counts: { total: number; pass: number; fail: number; outliers: number };
  if (frozen) {
    const list = frozen.devices as unknown as Frozen[];
    devices = list.map((d) => ({ device_id: d.device_id, result: d.result, reasons: d.reasons, power_class: d.power_class, pmp_w: d.figures.pmp_w ?? null, ff: d.figures.ff ?? null }));
    curveIds = list.map((d) => d.curve_id);
    specRef = frozen.specId ?? '';
    const c = frozen.counts;
    counts = { total: c.total ?? devices.length, pass: c.pass ?? 0, fail: c.fail ?? 0, outliers: c.outliers ?? 0 };
  } else {
    const e = await batchEvaluation(db, organizationId, b.id, specId);
    devices = e.devices.map((d) => ({
      device_id: d.device_id,
      result: d.result,
      reasons: d.reasons.map((r) => r.message),
      power_class: d.power_class,
      pmp_w: d.values.pmp_w ?? null,
      ff: d.values.ff ?? null,
    }));
    curveIds = e.devices.map((d) => d.curve_id);
    specRef = e.spec.id;
    counts = e.counts;
  }
  const { row: specRow, spec } = await loadSpec(db, organizationId, specRef);
  const flagRows = curveIds.length ? await db.select({ flags: curve.flags }).from(curve).where(and(eq(curve.batchId, b.id), inArray(curve.id, curveIds))) : [];
  const released = frozen ? { name: (await db.select({ name: user.name }).from(user).where(eq(user.id, frozen.releasedBy ?? '')))[0]?.name ?? 'a former member', at: frozen.createdAt } : null;
  return {
    batch: { name: b.name, lot: b.lot, line: b.line, product_type: b.product_type, supplier: b.supplier, batch_date: b.batch_date, cells: b.cells, state: b.state },
    release: frozen ? { revision: frozen.revision, comment: frozen.comment, csv_sha256: frozen.csvSha256 } : null,
    spec: { name: specRow.name, version: specRow.version, limits: limitLines(spec), fail_flags: spec.fail_flags ?? [], power_classes: powerClassLines(spec.power_classes, b.nameplate_w) },
    counts,
    powerClasses: powerClassCounts(devices),
    devices,
    histograms: [histogram('pmp_w', devices.map((d) => d.pmp_w), spec.limits?.pmp_w), histogram('ff', devices.map((d) => d.ff), spec.limits?.ff)],
    flags: flagCounts(flagRows.map((r) => r.flags)),
    submitted: await lastAction(db, b.id, 'submitted', frozen?.createdAt),
    released,
    caution: HV_CAUTION,
    madeAt: new Date(),
  };
}

/** The report as PDF bytes and its file name. */
export async function batchReportPdf(db: Db, organizationId: string, batchId: string, specId?: string): Promise<{ fileName: string; bytes: Buffer }> {
  const content = await reportContent(db, organizationId, batchId, specId);
  const safeName = content.batch.name.replace(/[^A-Za-z0-9._-]+/g, '_').slice(0, 60) || 'batch';
  return { fileName: `${safeName}-report-v${content.spec.version}.pdf`, bytes: await renderReportPdf(content) };
}
