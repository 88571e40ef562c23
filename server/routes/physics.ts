import { Router } from 'express';
import type { ErrorRequestHandler } from 'express';
import type { Db } from '@/db/client';
import { IvInputError } from '@/lib/iv';
import { PhysicsError } from '@/lib/physics';
import { bandDiagramSchema, curvePhysicsQuerySchema, materialQuerySchema, translateSchema } from '@/lib/schemas/physics';
import type { BandDiagramRequest, TranslateRequest } from '@/lib/schemas/physics';
import { HttpError } from '@/server/errors';
import { callerOf, requirePermission } from '@/server/permissions';
import { batchPhysics } from '@/server/services/batch-physics';
import { bandDiagramOf, curvePhysics, material, translateStoredCurve } from '@/server/services/physics';
import { validate } from '@/server/validate';

/** PhysicsError → 400 naming the input; an unreadable stored curve → 422. */
const physicsErrors: ErrorRequestHandler = (err, _req, _res, next) => {
  if (err instanceof PhysicsError) return next(new HttpError(400, 'invalid_input', err.message, { input: err.input }));
  if (err instanceof IvInputError) return next(new HttpError(422, err.code, err.message));
  return next(err);
};

/** /api/physics — carrier statistics, band diagrams and the physics of a fitted curve. */
export function physicsRouter(db: Db): Router {
  const r = Router();

  /**
   * GET /api/physics/material?temp_k=&from_k=&to_k= — n_i, Eg, Nc, Nv of silicon at temp_k (300 K
   * when omitted; keys as `ni --json`), the Altermatt et al. (2003) reference, and n_i from from_k
   * to to_k (200–400 K when omitted) for a chart; to_k must be above from_k.
   */
  r.get('/material', requirePermission('physics:use'), (req, res) => {
    res.json(material(materialQuerySchema.parse(req.query)));
  });

  /**
   * POST /api/physics/band-diagram — { type, doping_cm3, excess_cm3 | generation_cm3_s + lifetime_s, temp_k }:
   * Ec, Ev, Ei, E_F, E_Fn, E_Fp (eV from E_i) with Fermi–Dirac statistics, the Boltzmann result
   * beside it (splitting, implied Voc and their difference) and the occupation curves f(E).
   */
  r.post('/band-diagram', requirePermission('physics:use'), validate(bandDiagramSchema), (req, res) => {
    res.json(bandDiagramOf(req.body as BandDiagramRequest));
  });

  /**
   * GET /api/physics/curves/:id?from_c=&to_c= — the physics of a curve's current fits: J0 per cell
   * area, Voc predicted from from_c to to_c (−40…+85 °C when omitted; to_c above from_c), the Voc
   * temperature coefficient (two I0 laws), the implied Voc from Jsc and J0, the double-diode
   * recombination shares at MPP, and the stored STC figures.
   */
  r.get('/curves/:id', requirePermission('physics:use'), async (req, res) => {
    res.json(await curvePhysics(db, callerOf(req).organization.id, String(req.params.id), curvePhysicsQuerySchema.parse(req.query)));
  });

  /**
   * POST /api/physics/curves/:id/translate — { method: model | iec60891-1 | iec60891-2, to:
   * { irradiance_w_m2, temp_c }, coefficients… }: the curve moved to the target conditions, its key
   * figures beside the measured ones, and the translated curve (≤ 200 points).
   */
  r.post('/curves/:id/translate', requirePermission('physics:use'), validate(translateSchema), async (req, res) => {
    res.json(await translateStoredCurve(db, callerOf(req).organization.id, String(req.params.id), req.body as TranslateRequest));
  });

  /**
   * GET /api/physics/batches/:id — per curve of the batch: J0 per cell area from the current
   * single-diode fit and the implied Voc of the device at the fit temperature and at 25 °C (J0
   * moved by n_i(T)); the medians and quartiles of both; a curve without a usable fit is listed
   * with the reason. Another organisation's batch is 404.
   */
  r.get('/batches/:id', requirePermission('physics:use'), async (req, res) => {
    res.json(await batchPhysics(db, callerOf(req).organization.id, String(req.params.id)));
  });

  r.use(physicsErrors);
  return r;
}
