import { Router } from 'express';
import type { Request, RequestHandler } from 'express';
import type { Db } from '@/db/client';
import { readNumber } from '@/lib/schemas/numbers';
import { batchCreateSchema, batchUpdateSchema, characterisationQuerySchema, curveListQuerySchema, uploadOverridesSchema } from '@/lib/schemas/curves';
import { callerOf, requirePermission } from '@/server/permissions';
import { inlineAnalyser } from '@/server/services/analysis-pool';
import type { Analyser } from '@/server/services/analysis-pool';
import { sendAnswer } from '@/server/services/answer-cache';
import { batchReads } from '@/server/services/batch-reads';
import { createBatch, loadWritableBatch } from '@/server/services/batches';
import { batchCharacterisation } from '@/server/services/characterisation';
import { editBatch } from '@/server/services/stc-refresh';
import { uploadWithOriginals } from '@/server/services/originals-upload';
import type { ObjectStore } from '@/server/storage';
import { receivedFiles, removeReceived } from '@/server/upload-receiver';
import { validate } from '@/server/validate';
import { timingMark, timingReport, timingStart } from '@/server/services/upload-timing';

/**
 * /api/batches — batches, uploads, the batch table and overlay. `receiveFiles` streams an
 * upload's files to disk within the caps (server/upload-receiver.ts `receiveUploads`).
 */
export function batchesRouter(db: Db, receiveFiles: RequestHandler, analyser: Analyser = inlineAnalyser(), store: ObjectStore | null = null): Router {
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

  /** PATCH /api/batches/:id — rename, describe, archive or restore; new coefficients recompute the STC figures. */
  r.patch('/:id', requirePermission('batch:write'), validate(batchUpdateSchema), async (req, res) => {
    res.json(await editBatch(db, org(req), String(req.params.id), req.body));
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
      timingStart();
      await loadWritableBatch(db, org(req), String(req.params.id));
      receiveFiles(req, res, next);
    },
    async (req, res) => {
      timingMark('received');
      // A client that goes away stops the files not yet started (uploadCurves checks the signal).
      const gone = new AbortController();
      res.on('close', () => {
        if (!res.writableFinished) gone.abort();
      });
      try {
        const c = callerOf(req);
        const opts = uploadOverridesSchema.parse(req.body ?? {});
        const who = { organizationId: c.organization.id, userId: c.user.id };
        // Each file's original is kept in object storage before its curve (server/services/originals-upload.ts); storage down: 503.
        const { status, answer } = await uploadWithOriginals(db, store, analyser, who, String(req.params.id), receivedFiles(req), opts, gone.signal);
        if (!gone.signal.aborted) res.status(status).json(answer);
        timingMark('answered');
        timingReport();
      } finally {
        await removeReceived(req);
      }
    },
  );

  /** GET /api/batches/:id/curves — the batch table: paged, sorted, searched on the server. */
  r.get('/:id/curves', requirePermission('batch:read'), async (req, res) => {
    sendAnswer(res, await reads.curvePage(org(req), String(req.params.id), curveListQuerySchema.parse(req.query)));
  });

  /** GET /api/batches/:id/overlay?max=N — a sample of the batch's curves (at most 60, default 30), thinned for one chart. */
  r.get('/:id/overlay', requirePermission('batch:read'), async (req, res) => {
    // Decimal notation only (the one number reader): ?max=0x10 is not 16.
    const most = Math.min(60, Math.max(1, Math.round(readNumber(req.query.max) || 30)));
    sendAnswer(res, await reads.overlay(org(req), String(req.params.id), most));
  });

  /**
   * GET /api/batches/:id/characterisation?device=ID — the device type's characterisation from the
   * batch's curves of one device (default: the device with the most curves): α, β, γ with standard
   * errors, IEC 60891 parameters, the IEC 61853-1 matrix; or `reason` when the curves do not allow it.
   */
  r.get('/:id/characterisation', requirePermission('batch:read'), async (req, res) => {
    const { device } = characterisationQuerySchema.parse(req.query);
    res.json(await batchCharacterisation(db, org(req), String(req.params.id), device));
  });

  return r;
}
