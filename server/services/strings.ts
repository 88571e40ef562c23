/**
 * String voltage sizing from a batch, one curve or typed values: loads the curves and, when
 * needed, their fitted models, and applies the source rules of lib/strings/coefficients.ts.
 */
import { and, eq } from 'drizzle-orm';
import type { Db } from '@/db/client';
import { batch, curve, fit } from '@/db/schema';
import { MEASURED_MIN_SPAN_K } from '@/lib/schemas/strings';
import type { CoefficientSource, ModuleSource, StringSizeRequest, StringSizeResponse } from '@/lib/schemas/strings';
import { HV_CAUTION, sizeString, StringSizingError } from '@/lib/strings';
import type { StringSizingInput, StringSizingResult } from '@/lib/strings';
import {
  curveFacts,
  highestVocStc,
  lowestVmpStc,
  measuredCoefficient,
  measuredPoints,
  modelBetaVmp,
  modelBetaVoc,
  modelSource,
  r6,
  round3,
  roundSizing,
  spansEnough,
  stcModelOf,
} from '@/lib/strings/coefficients';
import type { CurveFacts, StcModel } from '@/lib/strings/coefficients';
import { HttpError, notFound } from '@/server/errors';

const FACT_COLUMNS = { id: curve.id, device_id: curve.deviceId, batchId: curve.batchId, meta: curve.meta, voc_v: curve.voc_v, metrics: curve.metrics, stc: curve.stc };

/** The curves a request names (a batch's or one), with the batch and its cell count; none for typed values. */
async function curvesOf(db: Db, organizationId: string, body: StringSizeRequest) {
  if (body.batch_id) {
    const [b] = await db.select().from(batch).where(and(eq(batch.id, body.batch_id), eq(batch.organizationId, organizationId)));
    if (!b) throw notFound('That batch');
    const rows = await db.select(FACT_COLUMNS).from(curve).where(eq(curve.batchId, b.id));
    return { mode: 'batch' as const, curves: rows.map(curveFacts), batchRef: { id: b.id, name: b.name }, defaultCells: b.cells ?? 1 };
  }
  if (body.curve_id) {
    const [row] = await db.select(FACT_COLUMNS).from(curve).where(and(eq(curve.id, body.curve_id), eq(curve.organizationId, organizationId)));
    if (!row) throw notFound('That curve');
    const [b] = await db.select({ id: batch.id, name: batch.name, cells: batch.cells }).from(batch).where(eq(batch.id, row.batchId));
    return { mode: 'curve' as const, curves: [curveFacts(row)], batchRef: b ? { id: b.id, name: b.name } : null, defaultCells: b?.cells ?? 1 };
  }
  return { mode: null, curves: [] as CurveFacts[], batchRef: null, defaultCells: 1 };
}

/** The STC model of a curve's current converged single-diode fit, or null. */
async function stcModel(db: Db, c: CurveFacts, defaultCells: number): Promise<StcModel | null> {
  const rows = await db.select().from(fit).where(and(eq(fit.curveId, c.id), eq(fit.current, true), eq(fit.model, 'single-diode')));
  return stcModelOf(rows, { temp_c: c.temp_c, cells: c.cells ?? defaultCells, irradiance_w_m2: c.irradiance_w_m2 });
}

/**
 * Most modules per series string below the system voltage limit on the coldest morning, least
 * modules for the inverter's MPP window when hot, and the margin. Voc at STC comes from the
 * batch's highest-Voc module (or the one curve), the Voc coefficient from curves at several
 * temperatures, else the fitted diode model, else the request; explicit values in the request
 * override the batch's. 404 for another organisation's batch or curve, 422 when the numbers
 * cannot be sized or a value the batch cannot give is missing.
 */
export async function sizeStringFor(db: Db, organizationId: string, body: StringSizeRequest): Promise<StringSizeResponse> {
  const { mode, curves, batchRef, defaultCells } = await curvesOf(db, organizationId, body);
  const sourceWarnings: string[] = [];
  const place = mode === 'batch' ? 'this batch' : 'this selection';

  // ---- Voc at STC: the highest of the batch (worst case), unless entered.
  let voc_stc_v = body.voc_stc_v;
  let moduleSource: ModuleSource = { kind: 'entered' };
  const withStc = curves.filter((x) => x.stc_voc_v !== null);
  if (voc_stc_v === undefined && mode) {
    const top = highestVocStc(withStc, mode);
    if (!top) {
      throw new HttpError(
        422,
        'no_module_data',
        curves.length
          ? `No curve in ${place} has a Voc at STC (no STC method held for any of them; each curve's page says why). Enter the module's Voc at STC (voc_stc_v) instead.`
          : 'This batch has no curves yet: upload its I-V files, or enter the module’s Voc at STC (voc_stc_v).',
      );
    }
    voc_stc_v = top.voc_v;
    moduleSource = top.source;
  }

  // The module whose fitted model gives the coefficients: the worst one, else the next highest with a converged fit.
  const byVoc = [...withStc].sort((a, b) => (b.stc_voc_v as number) - (a.stc_voc_v as number));
  let model: (StcModel & { of: CurveFacts }) | null | undefined;
  const theModel = async () => {
    if (model !== undefined) return model;
    model = null;
    for (const cand of byVoc.slice(0, 20)) {
      const m = await stcModel(db, cand, defaultCells);
      if (m) {
        model = { ...m, of: cand };
        break;
      }
    }
    return model;
  };

  // ---- Voc coefficient: measured across temperatures, else the model, else entered.
  let betaVoc = body.beta_voc_pct_per_k;
  let betaSource: CoefficientSource = { kind: 'entered' };
  if (betaVoc === undefined && mode) {
    const vocPoints = mode === 'batch' ? measuredPoints(curves, (x) => x.voc_v) : { points: [], span_k: 0 };
    if (spansEnough(vocPoints)) {
      const m = measuredCoefficient(vocPoints, 'Voc');
      betaVoc = m.beta;
      betaSource = m.source;
      sourceWarnings.push(...m.warnings);
    } else {
      const why =
        vocPoints.points.length >= 2
          ? `The batch's curves span only ${round3(vocPoints.span_k)} K of cell temperature, less than the ${MEASURED_MIN_SPAN_K} K needed to measure the coefficient, so the fitted model's is used.`
          : null;
      const m = await theModel();
      const b = m ? modelBetaVoc(m.p25, m.cells) : null;
      if (m && b !== null) {
        betaVoc = b;
        betaSource = modelSource(m, m.of, why);
      } else {
        throw new HttpError(
          422,
          'no_coefficient',
          `The Voc temperature coefficient cannot be taken from ${mode === 'batch' ? 'this batch' : 'this curve'}: ` +
            `${mode === 'batch' ? `its curves are not at temperatures ${MEASURED_MIN_SPAN_K} K or more apart, and ` : ''}no single-diode fit converged. ` +
            'Enter beta_voc_pct_per_k (crystalline silicon ≈ −0.3 %/K, common practice; use the module datasheet).',
        );
      }
    }
  }

  // ---- Vmp and its coefficient, only when the MPP window asks for them (or they were entered).
  let vmp_stc_v = body.vmp_stc_v;
  let betaVmp = body.beta_vmp_pct_per_k;
  let vmpSource: ModuleSource | null = vmp_stc_v !== undefined ? { kind: 'entered' } : null;
  let betaVmpSource: CoefficientSource | null = betaVmp !== undefined ? { kind: 'entered' } : null;
  if (body.mpp_window_min_v !== undefined && mode) {
    const low = vmp_stc_v === undefined ? lowestVmpStc(curves, mode) : null;
    if (low) {
      vmp_stc_v = low.vmp_v;
      vmpSource = low.source;
    }
    if (betaVmp === undefined) {
      const vmpPoints = mode === 'batch' ? measuredPoints(curves, (x) => x.vmp_v) : { points: [], span_k: 0 };
      if (spansEnough(vmpPoints)) {
        const m = measuredCoefficient(vmpPoints, 'Vmp');
        betaVmp = m.beta;
        betaVmpSource = m.source;
      } else {
        const m = await theModel();
        const b = m ? modelBetaVmp(m.p25, m.cells) : null;
        if (m && b !== null) {
          betaVmp = b;
          betaVmpSource = modelSource(m, m.of);
        }
      }
    }
  }

  const input: StringSizingInput = {
    voc_stc_v: voc_stc_v as number,
    beta_voc_pct_per_k: betaVoc as number,
    t_min_c: body.t_min_c,
    t_cell_max_c: body.t_cell_max_c,
    v_sys_v: body.v_sys_v,
    vmp_stc_v: vmp_stc_v,
    beta_vmp_pct_per_k: betaVmp,
    mpp_window_min_v: body.mpp_window_min_v,
    mpp_window_max_v: body.mpp_window_max_v,
  };
  let result: StringSizingResult;
  try {
    result = sizeString(input);
  } catch (err) {
    if (err instanceof StringSizingError) throw new HttpError(422, 'cannot_size', err.message);
    throw err;
  }

  return {
    ...roundSizing(result),
    warnings: [...sourceWarnings, ...result.warnings],
    inputs: {
      voc_stc_v: r6(input.voc_stc_v),
      beta_voc_pct_per_k: r6(input.beta_voc_pct_per_k),
      t_min_c: input.t_min_c,
      t_cell_max_c: input.t_cell_max_c ?? null,
      v_sys_v: input.v_sys_v,
      vmp_stc_v: input.vmp_stc_v === undefined ? null : r6(input.vmp_stc_v),
      beta_vmp_pct_per_k: input.beta_vmp_pct_per_k === undefined ? null : r6(input.beta_vmp_pct_per_k),
      mpp_window_min_v: input.mpp_window_min_v ?? null,
      mpp_window_max_v: input.mpp_window_max_v ?? null,
    },
    source: { batch: batchRef, module: moduleSource, beta_voc: betaSource, vmp_stc: vmpSource, beta_vmp: betaVmpSource },
    caution: HV_CAUTION.short,
  };
}
