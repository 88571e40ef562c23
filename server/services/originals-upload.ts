/**
 * An upload with its originals kept: every received file is stored byte for byte in object
 * storage under `org/<organisation>/batch/<batch>/<sha256>` and recorded in `original_file`
 * *before* any curve row that points to it (the object first, then its row, then the curve).
 * Storage down: that file is refused (`storage_unavailable`) and nothing of it reaches the
 * database; an upload in which no file was accepted and storage refused one is answered 503.
 */
import { createHash } from 'node:crypto';
import { sql } from 'drizzle-orm';
import type { Db } from '@/db/client';
import { originalFile } from '@/db/schema';
import type { uploadOverridesSchema } from '@/lib/schemas/curves';
import type { Analyser } from '@/server/services/analysis-pool';
import { uploadCurves } from '@/server/services/uploads';
import type { UploadAnswer, UploadedFile } from '@/server/services/uploads';
import { originalKey } from '@/server/storage';
import type { ObjectStore } from '@/server/storage';

/** The type an original is served with, from its name (the bytes are sent as received, no charset is claimed). */
export function contentTypeOf(name: string): string {
  const ext = /\.([a-z0-9]+)$/i.exec(name)?.[1]?.toLowerCase();
  if (ext === 'csv') return 'text/csv';
  if (ext === 'tsv') return 'text/tab-separated-values';
  if (ext === 'txt' || ext === 'dat' || ext === 'iv') return 'text/plain';
  return 'application/octet-stream';
}

type Who = { organizationId: string; userId: string };
type Kept = { id: string; sha256: string };

/** Stores one file's bytes and then its row; throws StorageUnavailableError (nothing written) when storage is down. */
async function keepOriginal(db: Db, store: ObjectStore, who: Who, batchId: string, name: string, bytes: Uint8Array, at: { began: Date; position: number }): Promise<Kept> {
  const sha256 = createHash('sha256').update(bytes).digest('hex');
  await store.put(originalKey(who.organizationId, batchId, sha256), bytes, contentTypeOf(name));
  const id = crypto.randomUUID();
  await db.insert(originalFile).values({ id, organizationId: who.organizationId, batchId, fileName: name, sha256, size: bytes.byteLength, contentType: contentTypeOf(name), uploadedBy: who.userId, createdAt: at.began, position: at.position });
  return { id, sha256 };
}

/**
 * POST /api/batches/:id/curves with the originals kept (uploadCurves does the reading, fitting
 * and storing; this wraps each file's reader so the bytes are archived as they are read).
 * Files the analysers never read (wrong type) are archived after the loop. Each result names
 * the `file_sha256` of what was received when the original was kept.
 */
export async function uploadWithOriginals(
  db: Db,
  store: ObjectStore | null,
  analyser: Analyser,
  who: Who,
  batchId: string,
  files: UploadedFile[],
  opts: ReturnType<typeof uploadOverridesSchema.parse>,
  signal?: AbortSignal,
): Promise<{ status: number; answer: UploadAnswer }> {
  const kept: (Kept | undefined)[] = [];
  const began = new Date();
  const wrapped: UploadedFile[] = store
    ? files.map((f, k) =>
        'read' in f
          ? {
              ...f,
              read: async () => {
                const bytes = await f.read();
                kept[k] = await keepOriginal(db, store, who, batchId, f.name, bytes, { began, position: k });
                return bytes;
              },
            }
          : f,
      )
    : files;
  const answer = await uploadCurves(db, analyser, who, batchId, wrapped, opts, signal);
  if (store && !signal?.aborted) {
    for (const [k, r] of answer.results.entries()) {
      const f = files[k];
      // Never read by the analysers (not an I-V file): kept all the same; storage down leaves it at its rejection.
      if (!kept[k] && !r.accepted && r.code === 'wrong_type' && f && 'read' in f) {
        kept[k] = await keepOriginal(db, store, who, batchId, f.name, await f.read(), { began, position: k }).catch(() => undefined);
      }
    }
    const rows = answer.results.flatMap((r, k) => {
      const x = kept[k];
      if (!x) return [];
      r.file_sha256 = x.sha256;
      return [{ id: x.id, result: r.accepted ? 'accepted' : 'rejected', code: r.accepted ? null : r.code, curve_id: r.accepted ? r.curve_id : null, device_id: r.device_id ?? null }];
    });
    if (rows.length) {
      await db.execute(sql`update ${originalFile} o set result = x.result, code = x.code, curve_id = x.curve_id, device_id = x.device_id
        from jsonb_to_recordset(${JSON.stringify(rows)}::jsonb) as x(id text, result text, code text, curve_id text, device_id text) where o.id = x.id`);
    }
  }
  const storageDown = answer.results.some((r) => !r.accepted && r.code === 'storage_unavailable');
  return { status: answer.accepted ? 201 : storageDown ? 503 : 422, answer };
}
