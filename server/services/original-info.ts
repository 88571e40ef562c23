/** Which kept original a curve was made from, and what its page says about it (no imports of other services: curves.ts reads it). */
import { and, asc, eq } from 'drizzle-orm';
import type { Db } from '@/db/client';
import { originalFile } from '@/db/schema';

export type OriginalRow = typeof originalFile.$inferSelect;

/** The row of the original a curve was made from: the row naming the curve, else one of its batch with the same bytes. */
export async function originalOfCurve(db: Db, c: { id: string; batchId: string; file_sha256: string | null }): Promise<OriginalRow | null> {
  if (!c.file_sha256) return null;
  const rows = await db
    .select()
    .from(originalFile)
    .where(and(eq(originalFile.batchId, c.batchId), eq(originalFile.sha256, c.file_sha256)))
    .orderBy(asc(originalFile.createdAt), asc(originalFile.position));
  return rows.find((r) => r.curveId === c.id) ?? rows.find((r) => !r.deletedAt) ?? rows[0] ?? null;
}

/** What a curve's page says about its original (null: stored without a file, such as the demo data). */
export async function originalInfo(db: Db, c: { id: string; batchId: string; file_sha256: string | null; file_size: number | null; fileName: string }) {
  const row = await originalOfCurve(db, c);
  if (!c.file_sha256) return null;
  return {
    file_name: row?.fileName ?? c.fileName,
    file_sha256: c.file_sha256,
    file_size_bytes: row?.size ?? c.file_size,
    content_type: row?.contentType ?? null,
    kept: !!row && !row.deletedAt,
    deleted_at: row?.deletedAt ? row.deletedAt.toISOString() : null,
    url: `/api/curves/${c.id}/original`,
  };
}

