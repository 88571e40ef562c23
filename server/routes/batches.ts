import { and, asc, count, desc, eq, ilike, inArray, max, sql } from 'drizzle-orm';
import { Router } from 'express';
import type { NextFunction, Request, Response } from 'express';
import multer from 'multer';
import type { Db } from '@/db/client';
import { batch, curve } from '@/db/schema';
import { MAX_FILE_BYTES } from '@/lib/iv';
import { describe as describeValues } from '@/lib/quality';
import { batchCreateSchema, batchUpdateSchema, curveListQuerySchema, uploadOverridesSchema } from '@/lib/schemas/curves';
import { HttpError, notFound } from '@/server/errors';
import { callerOf, requirePermission } from '@/server/permissions';
import { inlineAnalyser } from '@/server/services/analysis-pool';
import { AnswerCache, batchKey, sendAnswer, touchBatch } from '@/server/services/answer-cache';
import type { Analyser, AnalysisOutcome } from '@/server/services/analysis-pool';
import { curveJson, curveListColumns, fitsFor, storeCurves } from '@/server/services/curves';
import type { CurveToStore } from '@/server/services/curves';
import { validate } from '@/server/validate';

export const MAX_FILES_PER_REQUEST = 2000;
/** Curves stored per transaction during an upload (measured: ~1 ms a curve in groups of 25, ~3.5 ms one by one). */
const STORE_GROUP = 25;
const TEXT_EXTENSIONS = /\.(csv|tsv|txt|dat|iv)$/i;

type BatchRow = typeof batch.$inferSelect;

/** The caller's batch or 404 (another organisation's batch is "not found", never "forbidden"). */
export async function loadBatch(db: Db, req: Request): Promise<BatchRow> {
  const c = callerOf(req);
  const id = String(req.params.id ?? req.params.batchId);
  const [b] = await db.select().from(batch).where(and(eq(batch.id, id), eq(batch.organizationId, c.organization.id)));
  if (!b) throw notFound('That batch');
  return b;
}

/** 409 unless the batch may still change. */
export function assertWritable(b: BatchRow): void {
  if (b.state === 'released') throw new HttpError(409, 'batch_released', 'This batch is released and read-only.');
  if (b.archived) throw new HttpError(409, 'batch_archived', 'This batch is archived; restore it before changing it.');
}

export function batchJson(b: BatchRow, extra: Record<string, unknown> = {}) {
  return {
    id: b.id,
    name: b.name,
    productType: b.productType,
    supplier: b.supplier,
    line: b.line,
    lot: b.lot,
    batchDate: b.batchDate,
    cells: b.cells,
    area_cm2: b.area_cm2,
    nameplate_w: b.nameplate_w,
    description: b.description,
    archived: b.archived,
    state: b.state,
    createdAt: b.createdAt,
    updatedAt: b.updatedAt,
    ...extra,
  };
}

const upload = multer({
  storage: multer.memoryStorage(),
  limits: { fileSize: MAX_FILE_BYTES, files: MAX_FILES_PER_REQUEST, fields: 20, fieldSize: 1024 },
});

/** multer with its errors turned into Quasilevel's `{ code, message }`. */
function receiveFiles(req: Request, res: Response, next: NextFunction) {
  upload.array('files', MAX_FILES_PER_REQUEST)(req, res, (err: unknown) => {
    if (!err) return next();
    const e = err as { code?: string; field?: string };
    if (e.code === 'LIMIT_FILE_SIZE') return next(new HttpError(413, 'file_too_large', `A file is larger than the ${MAX_FILE_BYTES / 1024 / 1024} MB limit; nothing was stored.`));
    if (e.code === 'LIMIT_FILE_COUNT') return next(new HttpError(413, 'too_many_files', `At most ${MAX_FILES_PER_REQUEST} files per upload; nothing was stored. Split the upload.`));
    if (e.code === 'LIMIT_UNEXPECTED_FILE') return next(new HttpError(400, 'wrong_field', `Send the files in the form field "files" (got "${e.field}").`));
    if (e.code?.startsWith('LIMIT_')) return next(new HttpError(400, 'bad_upload', 'The upload form has too many or too large fields.'));
    return next(new HttpError(400, 'bad_upload', 'The upload could not be read as a multipart form.'));
  });
}

type UploadResult = { file: string; accepted: true; curveId: string; deviceId: string; replaced?: number } | { file: string; accepted: false; error: string; code: string; deviceId?: string; line?: number };

/** /api/batches — batches, uploads, the batch table and overlay. */
export function batchesRouter(db: Db, analyser: Analyser = inlineAnalyser()): Router {
  const r = Router();
  // Answers about one state of a batch (see answer-cache.ts): many people reading the same batch cost one computation.
  const answers = new AnswerCache();
  const aggregates = new Map<string, { stamp: number; curves: number; meanPmp: number | null }>();

  /** GET /api/batches — the organisation's batches with their curve counts. */
  r.get('/', requirePermission('batch:read'), async (req, res) => {
    const c = callerOf(req);
    // The organisation's batches in one state: their number and latest change name it.
    const [rev] = await db.select({ n: count(), last: max(batch.updatedAt) }).from(batch).where(eq(batch.organizationId, c.organization.id));
    const body = await answers.get(`org:${c.organization.id}@${rev.n}/${rev.last?.getTime() ?? 0}:list`, async () => {
      const rows = await db.select().from(batch).where(eq(batch.organizationId, c.organization.id)).orderBy(desc(batch.createdAt));
      // Curve count and mean Pmax per batch, kept per batch revision: while uploads go on, only
      // the batches that changed are counted again.
      const changed = rows.filter((b) => aggregates.get(b.id)?.stamp !== +b.updatedAt);
      if (changed.length) {
        const fresh = await db
          .select({ id: curve.batchId, curves: sql<number>`count(*)::int`, meanPmp: sql<number | null>`avg(${curve.pmp_w})` })
          .from(curve)
          .where(inArray(curve.batchId, changed.map((b) => b.id)))
          .groupBy(curve.batchId);
        const byId = new Map(fresh.map((f) => [f.id, f]));
        for (const b of changed) {
          const f = byId.get(b.id);
          aggregates.delete(b.id);
          aggregates.set(b.id, { stamp: +b.updatedAt, curves: f?.curves ?? 0, meanPmp: f?.meanPmp == null ? null : Number(f.meanPmp) });
        }
        while (aggregates.size > 10_000) aggregates.delete(aggregates.keys().next().value!);
      }
      return { batches: rows.map((b) => batchJson(b, { curveCount: aggregates.get(b.id)!.curves, meanPmp_w: aggregates.get(b.id)!.meanPmp })) };
    });
    sendAnswer(res, body);
  });

  /** POST /api/batches — create a batch (test engineers, QA leads). */
  r.post('/', requirePermission('batch:write'), validate(batchCreateSchema), async (req, res) => {
    const c = callerOf(req);
    const [b] = await db
      .insert(batch)
      .values({ id: crypto.randomUUID(), organizationId: c.organization.id, createdBy: c.user.id, ...req.body })
      .returning();
    res.status(201).json(batchJson(b));
  });

  /** GET /api/batches/:id — one batch with summary figures. */
  r.get('/:id', requirePermission('batch:read'), async (req, res) => {
    const b = await loadBatch(db, req);
    const body = await answers.get(batchKey(b, 'summary'), async () => {
      const rows = await db
        .select({ isc: curve.isc_a, voc: curve.voc_v, pmp: curve.pmp_w, ff: curve.ff, n: curve.n, rs: curve.rs_ohm, rsh: curve.rsh_ohm, stc: curve.stc_pmp_w, flags: curve.flagCodes })
        .from(curve)
        .where(eq(curve.batchId, b.id));
      const pick = (k: keyof (typeof rows)[number]) => rows.map((x) => x[k]).filter((v): v is number => typeof v === 'number' && Number.isFinite(v));
      const summary: Record<string, ReturnType<typeof describeValues> | null> = {};
      for (const [key, col] of [['isc_a', 'isc'], ['voc_v', 'voc'], ['pmp_w', 'pmp'], ['ff', 'ff'], ['n', 'n'], ['rs_ohm', 'rs'], ['rsh_ohm', 'rsh'], ['stc_pmp_w', 'stc']] as const) {
        const v = pick(col);
        summary[key] = v.length ? describeValues(v) : null;
      }
      const flagCounts: Record<string, number> = {};
      for (const x of rows) for (const f of x.flags.split(' ').filter(Boolean)) flagCounts[f] = (flagCounts[f] ?? 0) + 1;
      return batchJson(b, { curveCount: rows.length, summary, flagCounts });
    });
    sendAnswer(res, body);
  });

  /** PATCH /api/batches/:id — rename, describe, archive or restore. */
  r.patch('/:id', requirePermission('batch:write'), validate(batchUpdateSchema), async (req, res) => {
    const b = await loadBatch(db, req);
    if (b.state === 'released') throw new HttpError(409, 'batch_released', 'This batch is released and read-only.');
    const changes = Object.fromEntries(Object.entries(req.body).filter(([, v]) => v !== undefined));
    const [u] = await touchBatch(db, b.id, changes);
    res.json(batchJson(u));
  });

  /**
   * POST /api/batches/:id/curves — multipart upload, field `files` (one or many). Each file is
   * read and fitted on its own (on the analysis threads): a rejected file stores nothing and the
   * others go on; accepted curves are stored whole, up to 25 to a transaction.
   * Form fields tempC, irradiance_Wm2, cells, area_cm2 override every file's metadata;
   * onDuplicate = ask (default: a device already in the batch is refused) | replace | keep.
   */
  r.post('/:id/curves', requirePermission('batch:write'), async (req, res, next) => {
    const b = await loadBatch(db, req);
    assertWritable(b);
    receiveFiles(req, res, next);
  }, async (req, res) => {
    const c = callerOf(req);
    const b = await loadBatch(db, req);
    const opts = uploadOverridesSchema.parse(req.body ?? {});
    const files = (req.files as Express.Multer.File[] | undefined) ?? [];
    if (!files.length) throw new HttpError(400, 'no_files', 'No files were sent. Attach one or more I-V files in the form field "files".');

    const existing = await db.select({ id: curve.id, deviceId: curve.deviceId }).from(curve).where(eq(curve.batchId, b.id));
    const byDevice = new Map<string, string[]>();
    for (const e of existing) byDevice.set(e.deviceId, [...(byDevice.get(e.deviceId) ?? []), e.id]);

    // Every file goes to the analysers at once (worker threads in the server); the results are
    // stored in file order as they arrive, a group per transaction, while later files are fitted.
    const overrides = { tempC: opts.tempC ?? undefined, irradiance_Wm2: opts.irradiance_Wm2 ?? undefined, cells: opts.cells ?? undefined, area_cm2: opts.area_cm2 ?? undefined };
    const jobs = files.map((f) => {
      const name = Buffer.from(f.originalname, 'latin1').toString('utf8');
      const job: { name: string; outcome?: AnalysisOutcome; done?: Promise<unknown> } = { name };
      if (!TEXT_EXTENSIONS.test(name)) return job;
      job.done = analyser
        .analyse({ bytes: new Uint8Array(f.buffer.buffer, f.buffer.byteOffset, f.buffer.byteLength), fileName: name, overrides, defaults: { cells: b.cells, area_cm2: b.area_cm2 } })
        .then((o) => (job.outcome = o));
      return job;
    });
    const target = { organizationId: c.organization.id, batchId: b.id, userId: c.user.id };
    const group: CurveToStore[] = [];
    const flush = async () => {
      if (!group.length) return;
      await storeCurves(db, target, group.splice(0));
      // Hand the event loop back between groups so other requests are served during a big upload.
      await new Promise((r2) => setImmediate(r2));
    };

    const results: UploadResult[] = [];
    for (const job of jobs) {
      const name = job.name;
      if (!job.done) {
        results.push({ file: name, accepted: false, code: 'wrong_type', error: `${name} is not an I-V text file: send .csv, .tsv, .txt or .dat files.` });
        continue;
      }
      // Waiting for a file still being fitted does not flush the group: a transaction per curve costs ~5 ms, per curve in a group of 25 ~2 ms.
      if (!job.outcome) await job.done;
      const outcome = job.outcome!;
      if (!outcome.ok) {
        results.push(
          outcome.kind === 'input'
            ? { file: name, accepted: false, code: outcome.code, error: outcome.message, ...(outcome.line ? { line: outcome.line } : {}) }
            : { file: name, accepted: false, code: 'analysis_failed', error: `${name} could not be analysed: ${outcome.message}` },
        );
        continue;
      }
      const analysis = outcome.analysis;
      const deviceId = analysis.curve.meta.deviceId ?? name;
      const already = byDevice.get(deviceId) ?? [];
      if (already.length && opts.onDuplicate === 'ask') {
        results.push({ file: name, accepted: false, code: 'duplicate', deviceId, error: `Device ${deviceId} is already in this batch. Upload again choosing to replace it or to keep both.` });
        continue;
      }
      const replaceIds = opts.onDuplicate === 'replace' ? already : [];
      // A curve replacing one still waiting in the group: store that one first, as the upload's order says.
      if (replaceIds.some((id) => group.some((g) => g.id === id))) await flush();
      const curveId = crypto.randomUUID();
      group.push({ id: curveId, fileName: name, analysis, replaceIds });
      byDevice.set(deviceId, opts.onDuplicate === 'replace' ? [curveId] : [...already, curveId]);
      results.push({ file: name, accepted: true, curveId, deviceId, ...(replaceIds.length ? { replaced: replaceIds.length } : {}) });
      if (group.length >= STORE_GROUP) await flush();
    }
    await flush();
    const accepted = results.filter((x) => x.accepted).length;
    res.status(accepted ? 201 : 422).json({ results, accepted, rejected: results.length - accepted });
  });

  /** GET /api/batches/:id/curves — the batch table: paged, sorted, searched on the server. */
  r.get('/:id/curves', requirePermission('batch:read'), async (req, res) => {
    const b = await loadBatch(db, req);
    const q = curveListQuerySchema.parse(req.query);
    const body = await answers.get(batchKey(b, `curves:${JSON.stringify(q)}`), async () => {
      const sortCol = {
        device_id: curve.deviceId,
        isc_a: curve.isc_a,
        voc_v: curve.voc_v,
        pmp_w: curve.pmp_w,
        ff: curve.ff,
        n: curve.n,
        rs_ohm: curve.rs_ohm,
        rsh_ohm: curve.rsh_ohm,
        stc_pmp_w: curve.stc_pmp_w,
        created_at: curve.createdAt,
      }[q.sort];
      const conds = [eq(curve.batchId, b.id)];
      if (q.q) conds.push(ilike(curve.deviceId, `%${q.q.replace(/[\\%_]/g, (m) => '\\' + m)}%`));
      if (q.flag) conds.push(sql`(' ' || ${curve.flagCodes} || ' ') like ${'% ' + q.flag + ' %'}`);
      const where = and(...conds);
      const [{ total }] = await db.select({ total: count() }).from(curve).where(where);
      const rows = await db
        .select(curveListColumns)
        .from(curve)
        .where(where)
        .orderBy(q.dir === 'asc' ? sql`${sortCol} asc nulls last` : sql`${sortCol} desc nulls last`, asc(curve.id))
        .limit(q.pageSize)
        .offset((q.page - 1) * q.pageSize);
      const fits = await fitsFor(db, rows.map((x) => x.id), true, false);
      return { curves: rows.map((x) => curveJson(x, fits.get(x.id) ?? [], false)), total, page: q.page, pageSize: q.pageSize };
    });
    sendAnswer(res, body);
  });

  /** GET /api/batches/:id/overlay?max=N — a sample of the batch's curves, thinned for one chart. */
  r.get('/:id/overlay', requirePermission('batch:read'), async (req, res) => {
    const b = await loadBatch(db, req);
    const most = Math.min(60, Math.max(1, Number(req.query.max) || 30));
    const body = await answers.get(batchKey(b, `overlay:${most}`), async () => {
      const ids = await db.select({ id: curve.id }).from(curve).where(eq(curve.batchId, b.id)).orderBy(asc(curve.deviceId));
      const step = Math.max(1, ids.length / most);
      const chosen = Array.from({ length: Math.min(most, ids.length) }, (_, k) => ids[Math.floor(k * step)].id);
      const rows = chosen.length
        ? await db
            .select({ id: curve.id, deviceId: curve.deviceId, v: curve.voltage_V, i: curve.current_A, flags: curve.flagCodes })
            .from(curve)
            .where(sql`${curve.id} in ${chosen}`)
        : [];
      const thin = (arr: number[], k: number) => arr.filter((_, idx) => idx % k === 0 || idx === arr.length - 1);
      return {
        total: ids.length,
        sampled: rows.length,
        curves: rows.map((x) => {
          const k = Math.max(1, Math.ceil(x.v.length / 80));
          return { id: x.id, device_id: x.deviceId, flagged: x.flags.length > 0, voltage_V: thin(x.v, k), current_A: thin(x.i, k) };
        }),
      };
    });
    sendAnswer(res, body);
  });

  return r;
}
