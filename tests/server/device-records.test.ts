/**
 * deviceRecords reads each curve's stored comparison record (one JSON text a curve). It must give
 * exactly what the curve's columns give — the SQL fallback, which is also migration 0004's
 * backfill — and the figures the engine found for the file, for fitted and unfitted curves alike.
 * Curves: the demo files (invented, sample-data/) and the 1986 reference cell (tests/fixtures/reference-data).
 */
import { readFileSync } from 'node:fs';
import path from 'node:path';
import { eq } from 'drizzle-orm';
import type { Database } from '@/db/client';
import { batch, curve, organization } from '@/db/schema';
import { demoCurveFiles } from '@/server/services/seed';
import { analyseFile } from '@/lib/analysis/analyse-file';
import type { FileAnalysis } from '@/lib/analysis/analyse-file';
import { storeCurves } from '@/server/services/curves';
import { deviceRecords } from '@/server/services/quality';
import { REFERENCE_DATA_DIR } from '@/tests/support/reference-data';
import { openTestDatabase } from '@/tests/support/test-database';

const REF = REFERENCE_DATA_DIR;
let d: Database;
const analyses = new Map<string, FileAnalysis>();

beforeAll(async () => {
  d = await openTestDatabase();
  await d.db.insert(organization).values({ id: 'org', name: 'Records', slug: 'records', domain: 'records.example', createdAt: new Date() } as typeof organization.$inferInsert);
  await d.db.insert(batch).values({ id: 'b1', organizationId: 'org', name: 'Demo files' });
  const items = demoCurveFiles()
    .slice(0, 30)
    .map((f) => ({ id: crypto.randomUUID(), fileName: path.basename(f), analysis: analyseFile(readFileSync(f), { fileName: path.basename(f), defaults: { cells: 60, area_cm2: 16_610 } }) }));
  const read = analyseFile(readFileSync(path.join(REF, 'cell-57mm-33C.csv')), { fileName: 'ref-cell.csv', overrides: { temp_c: 33, cells: 1, area_cm2: 25.5 } });
  const cell = { ...read, curve: { ...read.curve, meta: { ...read.curve.meta, device_id: 'REF-CELL' } } };
  items.push({ id: crypto.randomUUID(), fileName: 'ref-cell.csv', analysis: cell });
  // The same curve as if its fits had failed (what a curve no diode describes is stored as).
  items.push({ id: crypto.randomUUID(), fileName: 'unfitted.csv', analysis: { ...cell, curve: { ...cell.curve, meta: { ...cell.curve.meta, device_id: 'UNFITTED' } }, fits: cell.fits.map((f) => ({ ...f, converged: false })) } });
  for (const it of items) analyses.set(it.analysis.curve.meta.device_id ?? it.fileName, it.analysis);
  await storeCurves(d.db, { organizationId: 'org', batchId: 'b1', userId: null }, items);
});
afterAll(() => d.close());

it('gives the same records from the stored record as from the columns (the backfill)', async () => {
  const fromRecord = await deviceRecords(d.db, ['b1']);
  await d.db.update(curve).set({ record: null }).where(eq(curve.batchId, 'b1'));
  const fromColumns = await deviceRecords(d.db, ['b1']);
  expect(fromRecord).toHaveLength(analyses.size);
  expect(fromColumns).toEqual(fromRecord);
});

it('carries the engine’s figures, the single-diode fit only when it converged, and J0 per cell area', async () => {
  const rows = await deviceRecords(d.db, ['b1']);
  for (const r of rows) {
    const a = analyses.get(r.device_id)!;
    expect(r.values.pmp_w).toBe(a.metrics.pmp_w);
    expect(r.values.voc_v).toBe(a.metrics.voc_v);
    const single = a.fits.find((f) => f.model === 'single-diode' && f.converged);
    expect(r.fitted).toBe(!!single);
    expect(r.values.rs_ohm).toBe(single ? single.rs_ohm : null);
    expect(r.flags).toEqual(a.flags.map((f) => f.code));
  }
  const ref = rows.find((r) => r.device_id === 'REF-CELL')!;
  const refFit = analyses.get('REF-CELL')!.fits.find((f) => f.model === 'single-diode')!;
  // J0 = I0 / (cell area): one cell of 25.5 cm².
  expect(ref.values.j0_a_cm2).toBeCloseTo((refFit.i0_a as number) / 25.5, 20);
  const unfitted = rows.find((r) => r.device_id === 'UNFITTED')!;
  expect(unfitted.fitted).toBe(false);
  expect(unfitted.values.i0_a).toBeNull();
  expect(unfitted.values.j0_a_cm2).toBeNull();
});

it('answers an empty list for batches without curves', async () => {
  await d.db.insert(batch).values({ id: 'b2', organizationId: 'org', name: 'Empty' });
  expect(await deviceRecords(d.db, ['b2'])).toEqual([]);
});
