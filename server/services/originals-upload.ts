/**
 * An upload with its originals kept: every received file is stored byte for byte in object
 * storage under `org/<organisation>/batch/<batch>/<sha256>` and recorded in `original_file`, never
 * after a curve row that points to it (the object first, then its row with or before the curve).
 * Storage down: that file is refused (`storage_unavailable`) and nothing of it reaches the
 * database; an upload in which no file was accepted and storage refused one is answered 503.
 */
import type { Db } from '@/db/client';
import { originalFile } from '@/db/schema';
import type { uploadOverridesSchema } from '@/lib/schemas/curves';
import type { Analyser } from '@/server/services/analysis-pool';
import { uploadCurves } from '@/server/services/uploads';
import type { Archive, UploadAnswer, UploadedFile } from '@/server/services/uploads';
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

/** Rows of `original_file` written in one statement at most (PostgreSQL takes up to 65,535 parameters, a row here uses 14). */
const ROWS_PER_INSERT = 500;

/**
 * POST /api/batches/:id/curves with the originals kept: uploadCurves reads, fits and stores; each
 * file's bytes go to object storage while it is analysed (up to its read-ahead window at once), and
 * their rows, with what became of each file, are written in the transaction that stores the
 * curves they made (rejected files' rows with the next group, or at the end). Each result names
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
  const began = new Date();
  const archive: Archive | undefined = store
    ? {
        put: (name, bytes, sha256) => store.put(originalKey(who.organizationId, batchId, sha256), bytes, contentTypeOf(name)),
        record: async (tx, kept) => {
          for (let k = 0; k < kept.length; k += ROWS_PER_INSERT) {
            await tx.insert(originalFile).values(
              kept.slice(k, k + ROWS_PER_INSERT).map(({ position, name, sha256, size, result: r }) => ({
                id: crypto.randomUUID(),
                organizationId: who.organizationId,
                batchId,
                fileName: name,
                sha256,
                size,
                contentType: contentTypeOf(name),
                uploadedBy: who.userId,
                createdAt: began,
                position,
                result: r.accepted ? 'accepted' : 'rejected',
                code: r.accepted ? null : r.code,
                curveId: r.accepted ? r.curve_id : null,
                deviceId: r.device_id ?? null,
              })),
            );
          }
        },
      }
    : undefined;
  const answer = await uploadCurves(db, analyser, who, batchId, files, opts, signal, archive);
  const storageDown = answer.results.some((r) => !r.accepted && r.code === 'storage_unavailable');
  return { status: answer.accepted ? 201 : storageDown ? 503 : 422, answer };
}
