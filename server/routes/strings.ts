import { and, eq } from 'drizzle-orm';
import { Router } from 'express';
import type { Db } from '@/db/client';
import { batch, curve, fit } from '@/db/schema';
import { singleParams } from '@/lib/analysis/analyse-file';
import { can } from '@/lib/auth/roles';
import type { SingleDiodeParams } from '@/lib/iv/types';
import { circuitFigures, paramsAtTemperature, PhysicsError, singleDiodeCircuit, vocTempCoefficient } from '@/lib/physics';
import { STC } from '@/lib/physics/constants';
import { MEASURED_MIN_SPAN_K, stringSizeSchema } from '@/lib/schemas/strings';
import type { CoefficientSource, MeasuredPoint, ModuleSource, StringSizeRequest, StringSizeResponse } from '@/lib/schemas/strings';
import { betaVocFromMeasurements, HV_CAUTION, sizeString, StringSizingError, worstModule } from '@/lib/strings';
import type { StringSizingInput, StringSizingResult } from '@/lib/strings';
import { HttpError, notFound } from '@/server/errors';
import { callerOf, requirePermission } from '@/server/permissions';
import { validate } from '@/server/validate';

/** Curves at irradiances outside this band are left out of the measured line (Voc also rises with light). */
const IRRADIANCE_BAND_WM2 = { min: 900, max: 1100 } as const;

const MEASURED_RULE =
  `Straight line through the batch-mean measured Voc at each cell temperature (rounded to 0.1 °C), ` +
  `over curves at ${IRRADIANCE_BAND_WM2.min}–${IRRADIANCE_BAND_WM2.max} W/m² or with no irradiance given; ` +
  `used when there are two or more temperatures spanning ≥ ${MEASURED_MIN_SPAN_K} K; relative to the line's Voc at 25 °C.`;
const MODEL_LAW_TEXT =
  'From the fitted single-diode model moved to 25 °C and 1000 W/m²: I0(T) ∝ n_i(T)^(2/n), Iph +0.05 %/K (common practice), ' +
  'n, Rs and Rsh held; dV/dT by a central difference over ±0.5 K, relative to the model’s value at 25 °C.';

type CurveFacts = {
  id: string;
  deviceId: string;
  tempC: number | null;
  irradiance_Wm2: number | null;
  cells: number | null;
  voc_V: number;
  vmp_V: number;
  stcVoc_V: number | null;
  stcVmp_V: number | null;
};

/** Rounds to 1 µV (or 1e-6 of any unit): exact enough, and free of binary noise in JSON. */
const r6 = (x: number): number => Math.round(x * 1e6) / 1e6;
/** For figures inside sentences. */
const round3 = (x: number): number => Math.round(x * 1000) / 1000;
const finite = (x: unknown): x is number => typeof x === 'number' && Number.isFinite(x);

/** The single-diode parameters of a fit moved to STC (25 °C, 1000 W/m²) by the n_i law, or null. */
function paramsAtStc(params: SingleDiodeParams, cells: number, fitTempC: number, irradiance_Wm2: number): SingleDiodeParams | null {
  try {
    const p = paramsAtTemperature(params, STC.tempC, { cells, fitTempC });
    return { ...p, iph_a: (p.iph_a * STC.irradiance_Wm2) / irradiance_Wm2 };
  } catch (err) {
    if (err instanceof PhysicsError) return null;
    throw err;
  }
}

/** Relative Vmp coefficient of a model at 25 °C, %/K: central difference over ±0.5 K with the n_i law. */
function modelBetaVmp(p25: SingleDiodeParams, cells: number): number | null {
  try {
    const at = (t: number) => circuitFigures(singleDiodeCircuit(paramsAtTemperature(p25, t, { cells, fitTempC: STC.tempC })), cells, t).vmp_v;
    const v25 = at(STC.tempC);
    const slope = (at(STC.tempC + 0.5) - at(STC.tempC - 0.5)) / 1;
    const beta = (100 * slope) / v25;
    return Number.isFinite(beta) && v25 > 0 ? beta : null;
  } catch (err) {
    if (err instanceof PhysicsError) return null;
    throw err;
  }
}

/** Batch-mean values per cell temperature, when the rule above says they make a measurement. */
function measuredPoints(curves: CurveFacts[], pick: (c: CurveFacts) => number): { points: MeasuredPoint[]; span_K: number } {
  const groups = new Map<number, { sum: number; n: number }>();
  for (const c of curves) {
    if (c.tempC === null || !finite(c.tempC)) continue;
    if (c.irradiance_Wm2 !== null && (c.irradiance_Wm2 < IRRADIANCE_BAND_WM2.min || c.irradiance_Wm2 > IRRADIANCE_BAND_WM2.max)) continue;
    const v = pick(c);
    if (!finite(v) || v <= 0) continue;
    const t = Math.round(c.tempC * 10) / 10;
    const g = groups.get(t) ?? { sum: 0, n: 0 };
    g.sum += v;
    g.n += 1;
    groups.set(t, g);
  }
  const points = [...groups.entries()].sort((a, b) => a[0] - b[0]).map(([tempC, g]) => ({ tempC, voc_V: g.sum / g.n, curves: g.n }));
  const span_K = points.length ? points[points.length - 1].tempC - points[0].tempC : 0;
  return { points, span_K };
}

/** The current converged single-diode fit of a curve with the conditions it was fitted at, or null. */
async function modelOf(db: Db, curveId: string, fallback: { tempC: number | null; cells: number; irradiance_Wm2: number | null }) {
  const rows = await db.select().from(fit).where(and(eq(fit.curveId, curveId), eq(fit.current, true), eq(fit.model, 'single-diode')));
  const params = singleParams(rows.map((r) => r.result));
  if (!params) return null;
  const cond = rows[0].conditions as { tempC?: unknown; cells?: unknown; irradiance_Wm2?: unknown };
  const fitTempC = finite(cond.tempC) ? cond.tempC : (fallback.tempC ?? STC.tempC);
  const cells = finite(cond.cells) && cond.cells >= 1 ? cond.cells : fallback.cells;
  const g = finite(cond.irradiance_Wm2) && cond.irradiance_Wm2 > 0 ? cond.irradiance_Wm2 : (fallback.irradiance_Wm2 ?? STC.irradiance_Wm2);
  const p25 = paramsAtStc(params, cells, fitTempC, g);
  return p25 ? { p25, fitTempC, cells } : null;
}

function round(result: StringSizingResult): StringSizingResult {
  const out: StringSizingResult = {
    ...result,
    voc_max_per_module_v: r6(result.voc_max_per_module_v),
    string_voc_max_v: r6(result.string_voc_max_v),
    margin_v: r6(result.margin_v),
    margin_pct: r6(result.margin_pct),
  };
  if (result.vmp_min_per_module_v !== undefined) out.vmp_min_per_module_v = r6(result.vmp_min_per_module_v);
  if (result.vmp_max_per_module_v !== undefined) out.vmp_max_per_module_v = r6(result.vmp_max_per_module_v);
  return out;
}

/** /api/strings — string voltage sizing from a batch, one curve or typed values. */
export function stringsRouter(db: Db): Router {
  const r = Router();

  /**
   * POST /api/strings/size — most modules per series string below the system voltage limit on
   * the coldest morning, least modules for the inverter's MPP window when hot, and the margin.
   * Voc at STC comes from the batch's highest-Voc module (or the one curve), the Voc coefficient
   * from curves at several temperatures, else the fitted diode model, else the request; explicit
   * values in the request override the batch's. 404 for another organisation's batch or curve,
   * 400 for a malformed request, 422 with lib/strings' message when the numbers cannot be sized.
   */
  r.post('/size', requirePermission('physics:use'), validate(stringSizeSchema), async (req, res) => {
    const c = callerOf(req);
    const body = req.body as StringSizeRequest;
    if ((body.batchId || body.curveId) && !can(c.role, 'batch:read')) {
      throw new HttpError(403, 'forbidden', `Your role (${c.role}) may not read batches: it needs batch:read. Type the module's values instead.`);
    }

    let curves: CurveFacts[] = [];
    let batchRef: { id: string; name: string } | null = null;
    let mode: 'batch' | 'curve' | null = null;
    let defaultCells = 1;
    const cols = {
      id: curve.id,
      deviceId: curve.deviceId,
      batchId: curve.batchId,
      meta: curve.meta,
      voc_v: curve.voc_v,
      metrics: curve.metrics,
      stc: curve.stc,
    };
    if (body.batchId) {
      const [b] = await db.select().from(batch).where(and(eq(batch.id, body.batchId), eq(batch.organizationId, c.organization.id)));
      if (!b) throw notFound('That batch');
      batchRef = { id: b.id, name: b.name };
      defaultCells = b.cells ?? 1;
      const rows = await db.select(cols).from(curve).where(eq(curve.batchId, b.id));
      curves = rows.map(toFacts);
      mode = 'batch';
    } else if (body.curveId) {
      const [row] = await db.select(cols).from(curve).where(and(eq(curve.id, body.curveId), eq(curve.organizationId, c.organization.id)));
      if (!row) throw notFound('That curve');
      const [b] = await db.select({ id: batch.id, name: batch.name, cells: batch.cells }).from(batch).where(eq(batch.id, row.batchId));
      batchRef = b ? { id: b.id, name: b.name } : null;
      defaultCells = b?.cells ?? 1;
      curves = [toFacts(row)];
      mode = 'curve';
    }
    function toFacts(x: { id: string; deviceId: string; meta: { tempC?: number; irradiance_Wm2?: number; cells?: number }; voc_v: number; metrics: { vmp_v: number }; stc: { voc_v: number; vmp_v: number } | null }): CurveFacts {
      return {
        id: x.id,
        deviceId: x.deviceId,
        tempC: finite(x.meta.tempC) ? x.meta.tempC : null,
        irradiance_Wm2: finite(x.meta.irradiance_Wm2) ? x.meta.irradiance_Wm2 : null,
        cells: finite(x.meta.cells) && x.meta.cells >= 1 ? x.meta.cells : null,
        voc_V: x.voc_v,
        vmp_V: x.metrics.vmp_v,
        stcVoc_V: x.stc && finite(x.stc.voc_v) && x.stc.voc_v > 0 ? x.stc.voc_v : null,
        stcVmp_V: x.stc && finite(x.stc.vmp_v) && x.stc.vmp_v > 0 ? x.stc.vmp_v : null,
      };
    }

    const sourceWarnings: string[] = [];
    const wantsMpp = body.mppWindow !== undefined;

    // ---- Voc at STC: the highest of the batch (worst case), unless entered.
    let vocStc_V = body.vocStc_V;
    let moduleSource: ModuleSource = { kind: 'entered' };
    const withStc = curves.filter((x) => x.stcVoc_V !== null);
    if (vocStc_V === undefined && mode) {
      if (!withStc.length) {
        throw new HttpError(
          422,
          'no_module_data',
          curves.length
            ? `No curve in ${mode === 'batch' ? 'this batch' : 'this selection'} has a Voc at STC (its single-diode fit did not converge). Enter the module's Voc at STC (vocStc_V) instead.`
            : 'This batch has no curves yet: upload its I-V files, or enter the module’s Voc at STC (vocStc_V).',
        );
      }
      const w = worstModule(withStc.map((x) => ({ deviceId: x.deviceId, voc_v: x.stcVoc_V })));
      const top = withStc[w.index];
      vocStc_V = w.voc_v;
      moduleSource = {
        kind: mode,
        deviceId: top.deviceId,
        curveId: top.id,
        value_V: r6(w.voc_v),
        modules: w.count,
        mean_V: r6(w.mean_voc_v),
        note: mode === 'batch' ? w.note : `Sized on the one curve chosen (${top.deviceId}, Voc ${r6(w.voc_v)} V at STC).`,
      };
    }

    // The module whose fitted model gives the coefficients: the worst one, else the next highest with a converged fit.
    const byVoc = [...withStc].sort((a, b) => (b.stcVoc_V as number) - (a.stcVoc_V as number));
    let model: { p25: SingleDiodeParams; fitTempC: number; cells: number; of: CurveFacts } | null | undefined;
    async function theModel() {
      if (model !== undefined) return model;
      model = null;
      for (const cand of byVoc.slice(0, 20)) {
        const m = await modelOf(db, cand.id, { tempC: cand.tempC, cells: cand.cells ?? defaultCells, irradiance_Wm2: cand.irradiance_Wm2 });
        if (m) {
          model = { ...m, of: cand };
          break;
        }
      }
      return model;
    }
    const modelSource = (m: NonNullable<typeof model>, note: string | null = null): CoefficientSource => ({
      kind: 'model',
      law: 'ni-power',
      lawText: MODEL_LAW_TEXT,
      deviceId: m.of.deviceId,
      curveId: m.of.id,
      fitTempC: m.fitTempC,
      cells: m.cells,
      note,
    });

    // ---- Voc coefficient: measured across temperatures, else the model, else entered.
    let betaVoc = body.betaVoc_pct_per_K;
    let betaSource: CoefficientSource = { kind: 'entered' };
    const vocPoints = mode === 'batch' ? measuredPoints(curves, (x) => x.voc_V) : { points: [], span_K: 0 };
    if (betaVoc === undefined && mode) {
      if (vocPoints.points.length >= 2 && vocPoints.span_K >= MEASURED_MIN_SPAN_K) {
        const m = betaVocFromMeasurements(vocPoints.points.map((p) => ({ tempC: p.tempC, voc_v: p.voc_V })));
        betaVoc = m.betaVoc_pct_per_K;
        betaSource = { kind: 'measured', points: vocPoints.points.map((p) => ({ ...p, voc_V: r6(p.voc_V) })), span_K: r6(m.span_K), r2: r6(m.r2), rule: MEASURED_RULE, warnings: m.warnings };
        sourceWarnings.push(...m.warnings);
      } else {
        const why =
          vocPoints.points.length >= 2
            ? `The batch's curves span only ${round3(vocPoints.span_K)} K of cell temperature, less than the ${MEASURED_MIN_SPAN_K} K needed to measure the coefficient, so the fitted model's is used.`
            : null;
        const m = await theModel();
        if (m) {
          try {
            const b = vocTempCoefficient(m.p25, { cells: m.cells, tempC: STC.tempC }).beta_pct_per_K;
            if (finite(b)) {
              betaVoc = b;
              betaSource = modelSource(m, why);
            }
          } catch (err) {
            if (!(err instanceof PhysicsError)) throw err;
          }
        }
        if (betaVoc === undefined) {
          throw new HttpError(
            422,
            'no_coefficient',
            `The Voc temperature coefficient cannot be taken from ${mode === 'batch' ? 'this batch' : 'this curve'}: ` +
              `${mode === 'batch' ? `its curves are not at temperatures ${MEASURED_MIN_SPAN_K} K or more apart, and ` : ''}no single-diode fit converged. ` +
              'Enter betaVoc_pct_per_K (crystalline silicon ≈ −0.3 %/K, common practice; use the module datasheet).',
          );
        }
      }
    }

    // ---- Vmp and its coefficient, only when the MPP window asks for them (or they were entered).
    let vmpStc_V = body.vmpStc_V;
    let betaVmp = body.betaVmp_pct_per_K;
    let vmpSource: ModuleSource | null = vmpStc_V !== undefined ? { kind: 'entered' } : null;
    let betaVmpSource: CoefficientSource | null = betaVmp !== undefined ? { kind: 'entered' } : null;
    if (wantsMpp && mode) {
      const withVmp = curves.filter((x) => x.stcVmp_V !== null);
      if (vmpStc_V === undefined && withVmp.length) {
        let low = withVmp[0];
        for (const x of withVmp) if ((x.stcVmp_V as number) < (low.stcVmp_V as number)) low = x;
        const mean = withVmp.reduce((s, x) => s + (x.stcVmp_V as number), 0) / withVmp.length;
        vmpStc_V = low.stcVmp_V as number;
        vmpSource = {
          kind: mode,
          deviceId: low.deviceId,
          curveId: low.id,
          value_V: r6(vmpStc_V),
          modules: withVmp.length,
          mean_V: r6(mean),
          note:
            withVmp.length > 1
              ? `The least modules use the lowest Vmp at STC of ${withVmp.length} modules (${low.deviceId}, ${round3(vmpStc_V)} V), not the mean (${round3(mean)} V), so that a string reaches the MPP window even if every module were as low.`
              : `Vmp at STC of ${low.deviceId}.`,
        };
      }
      if (betaVmp === undefined) {
        const vmpPoints = mode === 'batch' ? measuredPoints(curves, (x) => x.vmp_V) : { points: [], span_K: 0 };
        if (vmpPoints.points.length >= 2 && vmpPoints.span_K >= MEASURED_MIN_SPAN_K) {
          const m = betaVocFromMeasurements(vmpPoints.points.map((p) => ({ tempC: p.tempC, voc_v: p.voc_V })));
          betaVmp = m.betaVoc_pct_per_K;
          betaVmpSource = { kind: 'measured', points: vmpPoints.points.map((p) => ({ ...p, voc_V: r6(p.voc_V) })), span_K: r6(m.span_K), r2: r6(m.r2), rule: MEASURED_RULE.replace(/Voc/g, 'Vmp'), warnings: [] };
        } else {
          const m = await theModel();
          const b = m ? modelBetaVmp(m.p25, m.cells) : null;
          if (m && b !== null) {
            betaVmp = b;
            betaVmpSource = modelSource(m);
          }
        }
      }
    }

    const input: StringSizingInput = {
      vocStc_V: vocStc_V as number,
      betaVoc_pct_per_K: betaVoc as number,
      tMin_C: body.tMin_C,
      tCellMax_C: body.tCellMax_C,
      vSys_V: body.vSys_V,
      vmpStc_V: vmpStc_V,
      betaVmp_pct_per_K: betaVmp,
      mppWindow: body.mppWindow,
    };
    let result: StringSizingResult;
    try {
      result = sizeString(input);
    } catch (err) {
      if (err instanceof StringSizingError) throw new HttpError(422, 'cannot_size', err.message);
      throw err;
    }

    const answer: StringSizeResponse = {
      ...round(result),
      warnings: [...sourceWarnings, ...result.warnings],
      inputs: {
        vocStc_V: r6(input.vocStc_V),
        betaVoc_pct_per_K: r6(input.betaVoc_pct_per_K),
        tMin_C: input.tMin_C,
        tCellMax_C: input.tCellMax_C ?? null,
        vSys_V: input.vSys_V,
        vmpStc_V: input.vmpStc_V === undefined ? null : r6(input.vmpStc_V),
        betaVmp_pct_per_K: input.betaVmp_pct_per_K === undefined ? null : r6(input.betaVmp_pct_per_K),
        mppWindow: input.mppWindow ?? null,
      },
      source: { batch: batchRef, module: moduleSource, betaVoc: betaSource, vmpStc: vmpSource, betaVmp: betaVmpSource },
      caution: HV_CAUTION.short,
    };
    res.json(answer);
  });

  return r;
}
