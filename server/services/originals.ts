/**
 * Reading the raw-data archive: one curve's original file as uploaded, and a batch's originals
 * as a zip (yazl) with a manifest. Rows in `original_file` say what was kept; the bytes come from
 * object storage (server/storage), which down answers 503 (`storage_unavailable`).
 */
import { Readable } from 'node:stream';
import { and, asc, eq, isNull } from 'drizzle-orm';
import { ZipFile } from 'yazl';
import type { Db } from '@/db/client';
import { curve, originalFile } from '@/db/schema';
import { isoUtc, toCsv } from '@/lib/quality/csv';
import { HttpError } from '@/server/errors';
import { loadBatch } from '@/server/services/batches';
import { loadCurve } from '@/server/services/curves';
import { originalOfCurve } from '@/server/services/original-info';
import type { OriginalRow } from '@/server/services/original-info';
import { ObjectMissingError, originalKey, StorageUnavailableError } from '@/server/storage';
import type { ObjectStore } from '@/server/storage';

/** The store, or 503 when the server has none. */
export function storeOrUnavailable(store: ObjectStore | null): ObjectStore {
  if (!store) throw new StorageUnavailableError('Object storage is not configured on this server: original files are not kept.');
  return store;
}

/** The bytes of a kept original, 404 when storage has lost them (the archive check reports such). */
async function bytesOf(store: ObjectStore, row: OriginalRow): Promise<Buffer> {
  try {
    return await store.get(originalKey(row.organizationId, row.batchId, row.sha256));
  } catch (err) {
    if (err instanceof ObjectMissingError) throw new HttpError(404, 'original_missing', `The original file ${row.fileName} is recorded but not in object storage; an administrator can check the batch's archive.`);
    throw err;
  }
}

/** GET /api/curves/:id/original — the file as uploaded: its name, type and bytes. */
export async function curveOriginal(db: Db, store: ObjectStore | null, organizationId: string, curveId: string) {
  const c = await loadCurve(db, organizationId, curveId);
  const row = await originalOfCurve(db, c);
  if (!row) throw new HttpError(404, 'no_original', `Device ${c.deviceId} was stored without its file (demo data or stored before originals were kept).`);
  if (row.deletedAt) throw new HttpError(410, 'original_deleted', `The original file of device ${c.deviceId} was deleted on ${isoUtc(row.deletedAt)} after its retention period.`);
  const bytes = await bytesOf(storeOrUnavailable(store), row);
  return { fileName: row.fileName, contentType: row.contentType, sha256: row.sha256, bytes };
}

/** A zip entry name for an uploaded name: no folders, no "..", no control characters, unique in the zip. */
export function entryNames(names: string[], reserved: string[]): string[] {
  const used = new Set(reserved.map((r) => r.toLowerCase()));
  return names.map((n) => {
    let base = n.replace(/[\\/\u0000-\u001f\u007f]/g, '_').replace(/^\.+$/, '_').replace(/^([a-zA-Z]):/, '$1_');
    if (!base) base = '_';
    let name = base;
    for (let k = 2; used.has(name.toLowerCase()); k++) name = base.replace(/(\.[^.]*)?$/, (ext) => ` (${k})${ext}`);
    used.add(name.toLowerCase());
    return name;
  });
}

export const MANIFEST_NAME = 'manifest.csv';
export const MANIFEST_FIELDS = ['file_name', 'zip_entry', 'file_sha256', 'file_size_bytes', 'device_id', 'result', 'code', 'uploaded_at', 'deleted_at'] as const;

/**
 * GET /api/batches/:id/originals.zip — every original of the batch (kept ones) and `manifest.csv`:
 * one row per received file (file name, its entry in the zip, SHA-256, size in bytes, device id, result
 * — accepted, replaced, rejected or incomplete — the rejection's code, when it was uploaded and,
 * for deleted originals, when they were deleted). Storage is checked before the answer starts.
 */
export async function batchOriginalsZip(db: Db, store: ObjectStore | null, organizationId: string, batchId: string) {
  const b = await loadBatch(db, organizationId, batchId);
  const s = storeOrUnavailable(store);
  const rows = await db.select().from(originalFile).where(eq(originalFile.batchId, b.id)).orderBy(asc(originalFile.createdAt), asc(originalFile.position));
  const liveCurves = new Set((await db.select({ id: curve.id }).from(curve).where(eq(curve.batchId, b.id))).map((r) => r.id));
  // Down storage is a 503 before the first byte, not a broken zip.
  await s.ping();
  const kept = rows.filter((r) => !r.deletedAt);
  const names = entryNames(kept.map((r) => r.fileName), [MANIFEST_NAME]);
  const entryOf = new Map(kept.map((r, k) => [r.id, names[k]]));
  const result = (r: OriginalRow) => (r.result === 'accepted' ? (r.curveId && liveCurves.has(r.curveId) ? 'accepted' : 'replaced') : (r.result ?? 'incomplete'));
  const manifest = toCsv(
    MANIFEST_FIELDS,
    rows.map((r) => [r.fileName, entryOf.get(r.id) ?? '', r.sha256, r.size, r.deviceId ?? '', result(r), r.code ?? '', isoUtc(r.createdAt), r.deletedAt ? isoUtc(r.deletedAt) : '']),
  );
  const zip = new ZipFile();
  zip.addBuffer(Buffer.from(manifest, 'utf8'), MANIFEST_NAME, { mtime: new Date() });
  for (const r of kept) {
    zip.addReadStreamLazy(entryOf.get(r.id)!, { mtime: r.createdAt }, (cb) => {
      bytesOf(s, r).then(
        (bytes) => cb(null, Readable.from([bytes])),
        (err: unknown) => cb(err as Error, undefined as never),
      );
    });
  }
  zip.end();
  return { fileName: `${b.name.replace(/[^\w.-]+/g, '_') || 'batch'}-originals.zip`, stream: zip.outputStream, zip };
}

/** The kept originals of a batch (not deleted), oldest first. */
export async function keptOriginals(db: Db, batchId: string): Promise<OriginalRow[]> {
  return db.select().from(originalFile).where(and(eq(originalFile.batchId, batchId), isNull(originalFile.deletedAt))).orderBy(asc(originalFile.createdAt), asc(originalFile.position));
}
