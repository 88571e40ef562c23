import { Router } from 'express';
import type { NextFunction, Request, Response } from 'express';
import multer from 'multer';
import type { Db } from '@/db/client';
import { MAX_FILE_BYTES } from '@/lib/iv';
import { batchCreateSchema, batchUpdateSchema, curveListQuerySchema, uploadOverridesSchema } from '@/lib/schemas/curves';
import { HttpError } from '@/server/errors';
import { callerOf, requirePermission } from '@/server/permissions';
import { inlineAnalyser } from '@/server/services/analysis-pool';
import type { Analyser } from '@/server/services/analysis-pool';
import { sendAnswer } from '@/server/services/answer-cache';
import { batchReads } from '@/server/services/batch-reads';
import { createBatch, loadWritableBatch, updateBatch } from '@/server/services/batches';
import { uploadCurves } from '@/server/services/uploads';
import { validate } from '@/server/validate';

export const MAX_FILES_PER_REQUEST = 2000;

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

/** /api/batches — batches, uploads, the batch table and overlay. */
export function batchesRouter(db: Db, analyser: Analyser = inlineAnalyser()): Router {
  const r = Router();
  const reads = batchReads(db);
  const org = (req: Request) => callerOf(req).organization.id;

  /** GET /api/batches — the organisation's batches with their curve counts. */
  r.get('/', requirePermission('batch:read'), async (req, res) => {
    sendAnswer(res, await reads.list(org(req)));
  });

  /** POST /api/batches — create a batch (test engineers, QA leads). */
  r.post('/', requirePermission('batch:write'), validate(batchCreateSchema), async (req, res) => {
    const c = callerOf(req);
    res.status(201).json(await createBatch(db, { organizationId: c.organization.id, userId: c.user.id }, req.body));
  });

  /** GET /api/batches/:id — one batch with summary figures. */
  r.get('/:id', requirePermission('batch:read'), async (req, res) => {
    sendAnswer(res, await reads.summary(org(req), String(req.params.id)));
  });

  /** PATCH /api/batches/:id — rename, describe, archive or restore. */
  r.patch('/:id', requirePermission('batch:write'), validate(batchUpdateSchema), async (req, res) => {
    res.json(await updateBatch(db, org(req), String(req.params.id), req.body));
  });

  /**
   * POST /api/batches/:id/curves — multipart upload, field `files` (one or many). Each file is
   * read and fitted on its own (on the analysis threads): a rejected file stores nothing and the
   * others go on; accepted curves are stored whole, up to 25 to a transaction.
   * Form fields temp_c, irradiance_w_m2, cells, area_cm2 override every file's metadata;
   * on_duplicate = ask (default: a device already in the batch is refused) | replace | keep.
   */
  r.post(
    '/:id/curves',
    requirePermission('batch:write'),
    // Refused before the body is read: another organisation's, a released or an archived batch.
    async (req, res, next) => {
      await loadWritableBatch(db, org(req), String(req.params.id));
      receiveFiles(req, res, next);
    },
    async (req, res) => {
      const c = callerOf(req);
      const opts = uploadOverridesSchema.parse(req.body ?? {});
      const files = ((req.files as Express.Multer.File[] | undefined) ?? []).map((f) => ({
        // multer gives the name as latin-1; browsers send UTF-8.
        name: Buffer.from(f.originalname, 'latin1').toString('utf8'),
        bytes: new Uint8Array(f.buffer.buffer, f.buffer.byteOffset, f.buffer.byteLength),
      }));
      const answer = await uploadCurves(db, analyser, { organizationId: c.organization.id, userId: c.user.id }, String(req.params.id), files, opts);
      res.status(answer.accepted ? 201 : 422).json(answer);
    },
  );

  /** GET /api/batches/:id/curves — the batch table: paged, sorted, searched on the server. */
  r.get('/:id/curves', requirePermission('batch:read'), async (req, res) => {
    sendAnswer(res, await reads.curvePage(org(req), String(req.params.id), curveListQuerySchema.parse(req.query)));
  });

  /** GET /api/batches/:id/overlay?max=N — a sample of the batch's curves (at most 60, default 30), thinned for one chart. */
  r.get('/:id/overlay', requirePermission('batch:read'), async (req, res) => {
    const most = Math.min(60, Math.max(1, Number(req.query.max) || 30));
    sendAnswer(res, await reads.overlay(org(req), String(req.params.id), most));
  });

  return r;
}
