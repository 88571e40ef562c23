import { Router } from 'express';
import type { Response } from 'express';
import { z } from 'zod';
import type { Db } from '@/db/client';
import { actorOf, callerOf, requirePermission } from '@/server/permissions';
import { inlineAnalyser } from '@/server/services/analysis-pool';
import type { Analyser } from '@/server/services/analysis-pool';
import { batchOriginalsZip, curveOriginal } from '@/server/services/originals';
import { deleteBatchOriginals, verifyBatchOriginals } from '@/server/services/originals-admin';
import { reanalyseCurve } from '@/server/services/reanalyse';
import type { ObjectStore } from '@/server/storage';
import { validate } from '@/server/validate';

const reanalyseSchema = z.strictObject({ use_file_conditions: z.boolean({ message: 'use_file_conditions must be true or false.' }).optional() });

/** A download's headers: the name as uploaded (RFC 6266, UTF-8 through filename*), never shown inline. */
function download(res: Response, fileName: string, contentType: string) {
  res.attachment(fileName);
  res.setHeader('Content-Type', contentType);
}

/** /api/batches/:id/originals… — a batch's raw-data archive: the zip, the administrator's check and deletion. */
export function batchOriginalsRouter(db: Db, store: ObjectStore | null): Router {
  const r = Router();
  const org = (req: Parameters<typeof callerOf>[0]) => callerOf(req).organization.id;

  /** GET /api/batches/:id/originals.zip — every kept original and manifest.csv (name, SHA-256, size, device id, result). */
  r.get('/:id/originals.zip', requirePermission('batch:read'), async (req, res) => {
    const z = await batchOriginalsZip(db, store, org(req), String(req.params.id));
    download(res, z.fileName, 'application/zip');
    // A failure after the first byte cannot become a status: the download is cut off, never completed wrong.
    z.zip.on('error', (err: Error) => res.destroy(err));
    z.stream.pipe(res);
  });

  /** POST /api/batches/:id/originals/verify — re-hash every kept original; mismatches and missing objects listed. */
  r.post('/:id/originals/verify', requirePermission('archive:manage'), async (req, res) => {
    res.json(await verifyBatchOriginals(db, store, org(req), String(req.params.id)));
  });

  /** DELETE /api/batches/:id/originals — delete the kept originals (audit entry); 409 retention_period for a released batch inside it. */
  r.delete('/:id/originals', requirePermission('archive:manage'), async (req, res) => {
    res.json(await deleteBatchOriginals(db, store, actorOf(req), String(req.params.id)));
  });
  return r;
}

/** /api/curves/:id/original and /reanalyse — one curve's file as uploaded, and reading it again. */
export function curveOriginalsRouter(db: Db, store: ObjectStore | null, analyser: Analyser = inlineAnalyser()): Router {
  const r = Router();

  /** GET /api/curves/:id/original — the file as uploaded: its name, type and bytes. */
  r.get('/:id/original', requirePermission('batch:read'), async (req, res) => {
    const o = await curveOriginal(db, store, callerOf(req).organization.id, String(req.params.id));
    download(res, o.fileName, o.contentType);
    res.setHeader('X-Original-SHA256', o.sha256);
    res.send(o.bytes);
  });

  /** POST /api/curves/:id/reanalyse — read the original again with the current reader and fits; the earlier fits stay in the history. */
  r.post('/:id/reanalyse', requirePermission('batch:write'), validate(reanalyseSchema), async (req, res) => {
    const c = callerOf(req);
    res.json(await reanalyseCurve(db, store, analyser, { organizationId: c.organization.id, userId: c.user.id }, String(req.params.id), req.body as z.infer<typeof reanalyseSchema>));
  });
  return r;
}
