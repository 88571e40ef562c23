/**
 * An upload of I-V files into a batch: every file goes to the analysers at once (worker threads
 * in the server), the results are checked for duplicates and stored in file order as they
 * arrive, a group of curves per transaction, while later files are still being fitted.
 */
import { createHash } from 'node:crypto';
import { eq } from 'drizzle-orm';
import type { Db } from '@/db/client';
import type { Tx } from '@/server/services/batch-lock';
import { curve } from '@/db/schema';
import type { uploadOverridesSchema } from '@/lib/schemas/curves';
import { textProblem } from '@/lib/schemas/text';
import { HttpError } from '@/server/errors';
import { StorageUnavailableError } from '@/server/storage/object-store';
import type { AnalysisOutcome, Analyser } from '@/server/services/analysis-pool';
import type { QueuedAnalyser } from '@/server/services/analysis-jobs';
import { batchDefaults, loadWritableBatch } from '@/server/services/batches';
import { storeCurves } from '@/server/services/curves';
import type { CurveToStore } from '@/server/services/curves';
import type { UploadAnswerOut, UploadFileResult } from '@/lib/schemas/responses';
import { timed, timingMark } from '@/server/services/upload-timing';

/** Curves stored per transaction during an upload (measured: ~1 ms a curve in groups of 25, ~3.5 ms one by one). */
export const STORE_GROUP = 25;
const TEXT_EXTENSIONS = /\.(csv|tsv|txt|dat|iv)$/i;

/** Bytes and files being read and analysed ahead of the store step: bounds an upload's memory. */
const AHEAD_BYTES = 32 * 1024 * 1024;
const AHEAD_FILES = 64;
/** Longest device id stored (from the file's metadata or its name). */
export const MAX_DEVICE_ID_CHARS = 120;

/**
 * One received file: its name as sent (UTF-8), its size and a reader for its bytes (the file
 * waits on disk until its turn), or the receiver's rejection of it (a bad name, an unreadable part).
 */
export type UploadedFile =
  | { name: string; size: number; read: () => Promise<Uint8Array> }
  | { name: string; rejected: { code: string; error: string } };

/** One file's answer (lib/schemas/responses.ts uploadResultSchema). */
export type UploadResult = UploadFileResult;

export type UploadAnswer = UploadAnswerOut;

/** A kept original with what became of its file (the row originals-upload.ts writes). */
export type KeptOriginal = { position: number; name: string; sha256: string; size: number; result: UploadResult };

/**
 * Keeping every received file (server/services/originals-upload.ts): `put` stores one file's bytes
 * as an object while the file is analysed (throws StorageUnavailableError when storage is down);
 * `record` writes the rows of kept files with their results, in the transaction that stores their
 * curves (files without a curve: in one of their own, at the end), so an object always comes
 * before its row and its row before (or with) its curve.
 */
export type Archive = {
  put: (name: string, bytes: Uint8Array, sha256: string) => Promise<void>;
  record: (tx: Tx | Db, kept: KeptOriginal[]) => Promise<void>;
};

/**
 * Reads, fits and stores the files in the batch. A rejected file stores nothing and the others go
 * on; accepted curves are stored whole, up to STORE_GROUP to a transaction. The overrides replace
 * every file's metadata; on_duplicate: ask (a device already in the batch is refused) | replace | keep.
 * Files are read and analysed a window ahead of the store step (AHEAD_FILES, AHEAD_BYTES); once
 * `signal` aborts (the client went away) no further file is started and nothing more is stored
 * (originals kept by then without their rows are removed by the start-up cleanup).
 * With `archive`, every file read (I-V files or not) is kept as well; storage down refuses the file.
 */
export async function uploadCurves(
  db: Db,
  analyser: Analyser,
  who: { organizationId: string; userId: string },
  batchId: string,
  files: UploadedFile[],
  opts: ReturnType<typeof uploadOverridesSchema.parse>,
  signal?: AbortSignal,
  archive?: Archive,
): Promise<UploadAnswer> {
  const b = await loadWritableBatch(db, who.organizationId, batchId);
  if (!files.length) throw new HttpError(400, 'no_files', 'No files were sent. Attach one or more I-V files in the form field "files".');

  const existing = await db.select({ id: curve.id, deviceId: curve.deviceId }).from(curve).where(eq(curve.batchId, b.id));
  const byDevice = new Map<string, string[]>();
  for (const e of existing) byDevice.set(e.deviceId, [...(byDevice.get(e.deviceId) ?? []), e.id]);

  // PostgreSQL mode: curves are stored `queued` and their fits become jobs (analysis-jobs.ts).
  const queue = (analyser as Partial<QueuedAnalyser>).queue;
  const overrides = { temp_c: opts.temp_c ?? undefined, irradiance_w_m2: opts.irradiance_w_m2 ?? undefined, cells: opts.cells ?? undefined, area_cm2: opts.area_cm2 ?? undefined };
  type Job = { file: UploadedFile; sha256?: string; outcome?: AnalysisOutcome; done?: Promise<unknown>; size: number; kept?: boolean };
  const jobs: Job[] = files.map((file) => ({ file, size: 'size' in file ? file.size : 0 }));
  let started = 0;
  let aheadBytes = 0;
  /** Starts reading and analysing files up to the window past `cursor` (always the file at `cursor`). */
  const startUpTo = (cursor: number) => {
    while (started < jobs.length && !signal?.aborted && (started <= cursor || (started - cursor < AHEAD_FILES && aheadBytes < AHEAD_BYTES))) {
      const job = jobs[started++];
      const file = job.file;
      const text = TEXT_EXTENSIONS.test(file.name);
      // Not an I-V file: refused unread, or only kept when there is an archive.
      if (!('read' in file) || (!text && !archive)) continue;
      aheadBytes += job.size;
      job.done = file
        .read()
        .then(async (bytes): Promise<AnalysisOutcome | undefined> => {
          // Hashed before the bytes go to an analysis thread; a release record keeps the hash of what was received.
          const sha256 = createHash('sha256').update(bytes).digest('hex');
          job.sha256 = sha256;
          timingMark('sent to analyser');
          // With a job queue the request only reads and checks (key figures, flags); the fits are queued.
          const analysed = text ? timed('analysed', () => analyser.analyse({ bytes, fileName: file.name, overrides, defaults: batchDefaults(b), ...(queue ? { models: [] } : {}) })) : undefined;
          // The original is stored while the file is analysed; nothing of a file whose original failed is stored.
          if (archive) await timed('object put', () => archive.put(file.name, bytes, sha256));
          job.kept = !!archive;
          return analysed;
        })
        .catch((err: unknown): AnalysisOutcome =>
          // Object storage down: nothing of the file is stored (server/services/originals-upload.ts).
          err instanceof StorageUnavailableError
            ? { ok: false, kind: 'input', code: 'storage_unavailable', message: `${file.name} was not stored: ${err.message} Nothing of it was kept; upload it again.` }
            : { ok: false, kind: 'failure', message: `the received file could not be read back (${(err as Error)?.message ?? err})` },
        )
        .then((o) => (job.outcome = o));
    }
  };
  const target = { organizationId: who.organizationId, batchId: b.id, userId: who.userId };
  const group: CurveToStore[] = [];
  /** Kept originals whose rows are not written yet: they go with the next group's curves. */
  const kept: KeptOriginal[] = [];
  let stored = 0;
  const flush = async () => {
    const rows = kept.splice(0);
    if (!group.length) {
      if (rows.length) await archive!.record(db, rows);
      return;
    }
    const items = group.splice(0);
    try {
      await timed('stored', () => storeCurves(db, target, queue ? items.map((x) => ({ ...x, status: 'queued' as const })) : items, rows.length ? (tx) => archive!.record(tx, rows) : undefined));
      await queue?.enqueue(
        items.map((x) => x.id),
        files.length,
      );
    } catch (err) {
      // Released (or archived) while this upload was received or fitted: the state is checked where the curves are written.
      if (err instanceof HttpError && err.status === 409) {
        const before = stored ? ` The ${stored} curve(s) stored before that are part of it; the rest was not stored.` : ' Nothing was stored.';
        throw new HttpError(409, err.code, `${err.message}${before}`);
      }
      throw err;
    }
    stored += items.length;
    // Hand the event loop back between groups so other requests are served during a big upload.
    await new Promise((r) => setImmediate(r));
  };

  /** What became of file k (its outcome awaited); an accepted curve joins the group. */
  const judge = async (k: number, job: Job): Promise<UploadResult> => {
    const name = job.file.name;
    if ('rejected' in job.file) return { file: name, accepted: false, code: job.file.rejected.code, error: job.file.rejected.error };
    // Waiting for a file still being fitted does not flush the group: a transaction per curve costs ~5 ms, per curve in a group of 25 ~2 ms.
    if (job.done && !job.outcome) await timed('store loop waits', () => job.done!);
    aheadBytes -= job.done ? job.size : 0;
    const outcome = job.outcome;
    if (!outcome || !TEXT_EXTENSIONS.test(name)) return { file: name, accepted: false, code: 'wrong_type', error: `${name} is not an I-V text file: send .csv, .tsv, .txt or .dat files.` };
    if (!outcome.ok) {
      return outcome.kind === 'input'
        ? { file: name, accepted: false, code: outcome.code, error: outcome.message, ...(outcome.line ? { line: outcome.line } : {}) }
        : { file: name, accepted: false, code: 'analysis_failed', error: `${name} could not be analysed: ${outcome.message}` };
    }
    const analysis = outcome.analysis;
    const deviceId = analysis.curve.meta.device_id ?? name;
    const idProblem = textProblem(deviceId, { max: MAX_DEVICE_ID_CHARS });
    if (idProblem) return { file: name, accepted: false, code: 'bad_device_id', error: `The device id of ${name} ${idProblem}; shorten or correct it in the file.` };
    const already = byDevice.get(deviceId) ?? [];
    if (already.length && opts.on_duplicate === 'ask') {
      return { file: name, accepted: false, code: 'duplicate', device_id: deviceId, error: `Device ${deviceId} is already in this batch. Upload again choosing to replace it or to keep both.` };
    }
    const replaceIds = opts.on_duplicate === 'replace' ? already : [];
    // A curve replacing one still waiting in the group: store that one first, as the upload's order says.
    if (replaceIds.some((id) => group.some((g) => g.id === id))) await flush();
    const curveId = crypto.randomUUID();
    group.push({ id: curveId, fileName: name, analysis, replaceIds, fileSha256: job.sha256, fileSize: job.sha256 ? job.size : undefined });
    byDevice.set(deviceId, opts.on_duplicate === 'replace' ? [curveId] : [...already, curveId]);
    return { file: name, accepted: true, curve_id: curveId, device_id: deviceId, ...(replaceIds.length ? { replaced: replaceIds.length } : {}) };
  };

  const results: UploadResult[] = [];
  for (const [k, job] of jobs.entries()) {
    startUpTo(k);
    // The client went away: the work not yet started is not done, and nothing more is stored.
    if (signal?.aborted) break;
    const result = await judge(k, job);
    results.push(result);
    if (job.kept && job.sha256) {
      result.file_sha256 = job.sha256;
      kept.push({ position: k, name: job.file.name, sha256: job.sha256, size: job.size, result });
    }
    if (group.length >= STORE_GROUP) await flush();
  }
  if (!signal?.aborted) await flush();
  const accepted = results.filter((x) => x.accepted).length;
  return { results, accepted, rejected: results.length - accepted };
}
