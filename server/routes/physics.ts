import { and, eq } from 'drizzle-orm';
import { Router } from 'express';
import type { ErrorRequestHandler, Request } from 'express';
import type { Db } from '@/db/client';
import { batch, curve } from '@/db/schema';
import { doubleDiodeParamsOf, IvInputError, singleDiodeParamsOf } from '@/lib/iv';
import type { DoubleDiodeParams, FitResult, IvCurve, SingleDiodeParams } from '@/lib/iv';
import {
  bandDiagram,
  cellAreaOf,
  impliedVocFromJ0,
  j0FromI0,
  materialAt,
  occupationCurve,
  PhysicsError,
  predictVocVsTemperature,
  quasiFermiLevels,
  recombinationSharesAtMpp,
  SILICON,
  translateCurve,
  vocTempCoefficient,
} from '@/lib/physics';
import type { TranslationRequest } from '@/lib/physics';
import { STC, ZERO_C_IN_K } from '@/lib/physics/constants';
import { bandDiagramSchema, materialQuerySchema, translateSchema } from '@/lib/schemas/physics';
import type { BandDiagramRequest, TranslateRequest } from '@/lib/schemas/physics';
import { HttpError, notFound } from '@/server/errors';
import { callerOf, requirePermission } from '@/server/permissions';
import { fitsFor } from '@/server/services/curves';
import { validate } from '@/server/validate';

/**
 * The n_i value the screen shows beside the model's: Altermatt et al. (2003), J. Appl. Phys.
 * 93:1598, silicon at 300 K. The library's model (Couderc et al. 2014) is fitted to agree with it.
 */
export const NI_REFERENCE = { tempK: 300, ni_cm3: 9.65e9, source: 'Altermatt et al. 2003, J. Appl. Phys. 93:1598' } as const;

/** Temperatures of the n_i chart, K. */
const NI_SERIES_K = { from: 200, to: 400, step: 5 };
/** Temperatures of the Voc prediction, °C (a module's datasheet range). */
const VOC_SERIES_C = { from: -40, to: 85, step: 5 };
/** Most points a translated curve is sent with. */
const MAX_CURVE_POINTS = 200;

type CurveRow = typeof curve.$inferSelect;

/** Every value of `x` is a finite number (or not a number at all); otherwise 422 naming where. */
function assertFiniteJson(x: unknown, where = 'result'): void {
  if (typeof x === 'number') {
    if (!Number.isFinite(x)) throw new HttpError(422, 'out_of_range', `${where} came out as ${x}: the inputs are outside what the models can compute.`);
    return;
  }
  if (Array.isArray(x)) x.forEach((v, k) => assertFiniteJson(v, `${where}[${k}]`));
  else if (x && typeof x === 'object') for (const [k, v] of Object.entries(x)) assertFiniteJson(v, `${where}.${k}`);
}

/** Evenly spaced indices, first and last kept, at most `max` points. */
export function thinCurve(c: { voltage_V: number[]; current_A: number[] }, max = MAX_CURVE_POINTS): { voltage_V: number[]; current_A: number[] } {
  const n = c.voltage_V.length;
  if (n <= max) return { voltage_V: [...c.voltage_V], current_A: [...c.current_A] };
  const idx = Array.from({ length: max }, (_, k) => Math.round((k * (n - 1)) / (max - 1)));
  return { voltage_V: idx.map((k) => c.voltage_V[k]), current_A: idx.map((k) => c.current_A[k]) };
}

const singleOf = (f: FitResult | undefined): SingleDiodeParams | null => singleDiodeParamsOf(f);
const doubleOf = (f: FitResult | undefined): DoubleDiodeParams | null => doubleDiodeParamsOf(f);

/** Runs `fn`; a PhysicsError becomes a note and null, so one section's failure does not sink the rest. */
function attempt<T>(what: string, notes: string[], fn: () => T): T | null {
  try {
    return fn();
  } catch (err) {
    if (err instanceof PhysicsError) {
      notes.push(`${what} could not be computed: ${err.message}`);
      return null;
    }
    throw err;
  }
}

/** The band-diagram answer: the Fermi–Dirac result, the Boltzmann one beside it, occupation curves. */
function bandDiagramJson(input: BandDiagramRequest) {
  const q = quasiFermiLevels(input);
  const d = bandDiagram(input);
  const occupation = occupationCurve(d, { points: 121 });
  return {
    input: { type: input.type, doping_cm3: input.doping_cm3, excess_cm3: q.excess_cm3, tempK: input.tempK },
    material: { name: SILICON.name, eg_ev: q.material.eg_eV, egDos_eV: q.material.egDos_eV, ni_cm3: q.material.ni_cm3, kT_eV: q.material.kT_eV },
    diagram: d,
    fermiDirac: {
      ef_eV: q.ef_eV,
      efn_eV: q.efn_eV,
      efp_eV: q.efp_eV,
      n0_cm3: q.n0_cm3,
      p0_cm3: q.p0_cm3,
      n_cm3: q.n_cm3,
      p_cm3: q.p_cm3,
      etaN: q.etaN,
      etaP: q.etaP,
      splitting_eV: q.splitting_eV,
      impliedVoc_V: q.impliedVoc_V,
    },
    boltzmann: {
      ef_eV: q.boltzmann.ef_eV,
      efn_eV: q.boltzmann.efn_eV,
      efp_eV: q.boltzmann.efp_eV,
      n0_cm3: q.boltzmann.n0_cm3,
      p0_cm3: q.boltzmann.p0_cm3,
      splitting_eV: q.boltzmann.splitting_eV,
      impliedVoc_V: q.boltzmann.impliedVoc_V,
    },
    /** Boltzmann minus Fermi–Dirac. */
    difference: { splitting_eV: q.boltzmann.splitting_eV - q.splitting_eV, impliedVoc_V: q.boltzmann.impliedVoc_V - q.impliedVoc_V },
    degenerate: q.degenerate,
    occupation,
  };
}

/** Cell temperature, cells in series and irradiance a curve's fits used (fit conditions, then metadata). */
function conditionsOf(row: CurveRow, fit: { conditions: Record<string, unknown> } | undefined) {
  const num = (v: unknown) => (typeof v === 'number' && Number.isFinite(v) ? v : null);
  const tempC = num(fit?.conditions.tempC) ?? num(row.meta.tempC) ?? 25;
  const cells = num(fit?.conditions.cells) ?? num(row.meta.cells) ?? 1;
  const irradiance = num(fit?.conditions.irradiance_Wm2) ?? num(row.meta.irradiance_Wm2);
  return { tempC, cells, irradiance_Wm2: irradiance, area_cm2: num(row.meta.area_cm2) };
}

/** PhysicsError → 400 naming the input; an unreadable stored curve → 422. */
const physicsErrors: ErrorRequestHandler = (err, _req, _res, next) => {
  if (err instanceof PhysicsError) return next(new HttpError(400, 'invalid_input', err.message, { input: err.input }));
  if (err instanceof IvInputError) return next(new HttpError(422, err.code, err.message));
  return next(err);
};

/** /api/physics — carrier statistics, band diagrams and the physics of a fitted curve. */
export function physicsRouter(db: Db): Router {
  const r = Router();

  async function loadCurve(req: Request): Promise<CurveRow> {
    const c = callerOf(req);
    const [row] = await db.select().from(curve).where(and(eq(curve.id, String(req.params.id)), eq(curve.organizationId, c.organization.id)));
    if (!row) throw notFound('That curve');
    return row;
  }

  async function currentFits(row: CurveRow) {
    const fits = (await fitsFor(db, [row.id], true)).get(row.id) ?? [];
    return { single: fits.find((f) => f.model === 'single-diode'), double: fits.find((f) => f.model === 'double-diode') };
  }

  /**
   * GET /api/physics/material?tempK= — n_i, Eg, Nc, Nv of silicon at tempK (300 K when omitted;
   * keys as `ni --json`), the Altermatt et al. (2003) reference, and n_i over 200–400 K for a chart.
   */
  r.get('/material', requirePermission('physics:use'), (req, res) => {
    const { tempK } = materialQuerySchema.parse(req.query);
    const s = materialAt(tempK);
    const series: { tempK: number[]; ni_cm3: number[] } = { tempK: [], ni_cm3: [] };
    for (let t = NI_SERIES_K.from; t <= NI_SERIES_K.to; t += NI_SERIES_K.step) {
      series.tempK.push(t);
      series.ni_cm3.push(materialAt(t).ni_cm3);
    }
    const body = {
      tempK,
      tempC: tempK - ZERO_C_IN_K,
      ni_cm3: s.ni_cm3,
      eg_ev: s.eg_eV,
      nc_cm3: s.nc_cm3,
      nv_cm3: s.nv_cm3,
      egDos_eV: s.egDos_eV,
      kT_eV: s.kT_eV,
      material: { id: SILICON.id, name: SILICON.name, tempRangeK: SILICON.tempRangeK, maxDoping_cm3: SILICON.maxDoping_cm3, sources: SILICON.sources },
      reference: { ...NI_REFERENCE, modelAtReference_cm3: materialAt(NI_REFERENCE.tempK).ni_cm3 },
      series,
    };
    assertFiniteJson(body);
    res.json(body);
  });

  /**
   * POST /api/physics/band-diagram — { type, doping_cm3, excess_cm3 | generation_cm3s + lifetime_s, tempK }:
   * Ec, Ev, Ei, E_F, E_Fn, E_Fp (eV from E_i) with Fermi–Dirac statistics, the Boltzmann result
   * beside it (splitting, implied Voc and their difference) and the occupation curves f(E).
   */
  r.post('/band-diagram', requirePermission('physics:use'), validate(bandDiagramSchema), (req, res) => {
    const body = bandDiagramJson(req.body as BandDiagramRequest);
    assertFiniteJson(body);
    res.json(body);
  });

  /**
   * GET /api/physics/curves/:id — the physics of a curve's current fits: J0 per cell area, Voc
   * predicted over −40…+85 °C, the Voc temperature coefficient (two I0 laws), the implied Voc from
   * Jsc and J0, the double-diode recombination shares at MPP, and the stored STC figures.
   */
  r.get('/curves/:id', requirePermission('physics:use'), async (req, res) => {
    const row = await loadCurve(req);
    const fits = await currentFits(row);
    const [b] = await db.select({ id: batch.id, name: batch.name }).from(batch).where(eq(batch.id, row.batchId));
    const cond = conditionsOf(row, fits.single ?? fits.double);
    const notes: string[] = [];
    const cellArea_cm2 = cond.area_cm2 != null ? attempt('The cell area', notes, () => cellAreaOf(cond.area_cm2 as number, cond.cells)) : null;
    if (cond.area_cm2 == null) notes.push('The curve has no device area, so J0 (a current per area) cannot be given; refit it with the area to see J0.');

    const sp = singleOf(fits.single?.result);
    if (!fits.single) notes.push('The curve has no single-diode fit.');
    else if (!sp) notes.push(`The single-diode fit did not converge${fits.single.result.message ? `: ${fits.single.result.message}` : ''}.`);
    const single = sp
      ? (() => {
          const j0 = cellArea_cm2 != null ? attempt('J0', notes, () => j0FromI0(sp.i0_a, cellArea_cm2)) : null;
          const isc = row.metrics.isc_a;
          const impliedVoc_V =
            isc > 0
              ? attempt('The implied Voc', notes, () =>
                  // Jsc/J0 = Isc/I0: the area cancels, so the implied Voc needs no area.
                  impliedVocFromJ0({ jsc_A_per_cm2: cellArea_cm2 ? isc / cellArea_cm2 : isc, j0_A_per_cm2: j0 ?? sp.i0_a, n: sp.n, tempC: cond.tempC, cells: cond.cells }),
                )
              : null;
          const opts = { cells: cond.cells, tempC: cond.tempC };
          const coefficient = attempt('The Voc temperature coefficient', notes, () => vocTempCoefficient(sp, opts));
          const coefficientDeSoto = attempt('The Voc temperature coefficient (De Soto law)', notes, () => vocTempCoefficient(sp, { ...opts, law: 'desoto' }));
          const series = attempt('Voc across temperature', notes, () =>
            predictVocVsTemperature(sp, { cells: cond.cells, fitTempC: cond.tempC, fromC: VOC_SERIES_C.from, toC: VOC_SERIES_C.to, stepC: VOC_SERIES_C.step }),
          );
          return {
            params: sp,
            j0_A_per_cm2: j0,
            impliedVoc: impliedVoc_V == null ? null : { voc_V: impliedVoc_V, jsc_A_per_cm2: cellArea_cm2 ? isc / cellArea_cm2 : null, isc_a: isc, measuredVoc_V: row.metrics.voc_v },
            coefficient,
            coefficientDeSoto,
            vocVsTemperature: series ? { law: series.law, points: series.points.map((p) => ({ tempC: p.tempC, voc_V: p.voc_V })) } : null,
          };
        })()
      : null;

    const dp = doubleOf(fits.double?.result);
    if (fits.double && !dp) notes.push('The double-diode fit did not converge.');
    const double = dp
      ? {
          params: dp,
          j01_A_per_cm2: cellArea_cm2 != null ? attempt('J01', notes, () => j0FromI0(dp.i01_a, cellArea_cm2)) : null,
          j02_A_per_cm2: cellArea_cm2 != null ? attempt('J02', notes, () => j0FromI0(dp.i02_a, cellArea_cm2)) : null,
          shares: attempt('The recombination shares at MPP', notes, () => recombinationSharesAtMpp(dp, { cells: cond.cells, tempC: cond.tempC })),
        }
      : null;

    const body = {
      curve: { id: row.id, device_id: row.deviceId, batch: b ?? null, meta: row.meta, metrics: row.metrics },
      conditions: { ...cond, cellArea_cm2 },
      stc: row.stc,
      single,
      double,
      notes,
    };
    assertFiniteJson(body);
    res.json(body);
  });

  /**
   * POST /api/physics/curves/:id/translate — { method: model | iec60891-1 | iec60891-2, to:
   * { irradiance_Wm2, tempC }, coefficients… }: the curve moved to the target conditions, its key
   * figures beside the measured ones, and the translated curve (≤ 200 points).
   */
  r.post('/curves/:id/translate', requirePermission('physics:use'), validate(translateSchema), async (req, res) => {
    const row = await loadCurve(req);
    const body = req.body as TranslateRequest;
    const fits = await currentFits(row);
    const cond = conditionsOf(row, fits.single);
    const notes: string[] = [];
    const from = { irradiance_Wm2: cond.irradiance_Wm2 ?? STC.irradiance_Wm2, tempC: cond.tempC };
    if (cond.irradiance_Wm2 == null) notes.push('The curve gives no irradiance: it was taken as measured at 1000 W/m².');
    const measured: IvCurve = { voltage_V: row.voltage_V, current_A: row.current_A, meta: row.meta, notes: [] };
    let request: TranslationRequest;
    if (body.method === 'model') {
      const sp = singleOf(fits.single?.result);
      if (!sp) throw new HttpError(422, 'no_fit', 'The model translation needs a converged single-diode fit of this curve, and it has none. Use an IEC 60891 procedure or refit the curve.');
      request = { method: 'model', params: sp, cells: cond.cells, from, to: body.to, alpha_isc_A_per_K: body.alpha_isc_A_per_K, i0Law: body.i0Law, points: 121 };
    } else if (body.method === 'iec60891-1') {
      request = {
        method: 'iec60891-1',
        from,
        to: body.to,
        alpha_A_per_K: body.alpha_A_per_K as number,
        beta_V_per_K: body.beta_V_per_K as number,
        rs_ohm: body.rs_ohm as number,
        kappa_ohm_per_K: body.kappa_ohm_per_K as number,
        isc1_a: row.metrics.isc_a,
      };
    } else {
      request = {
        method: 'iec60891-2',
        from,
        to: body.to,
        alpha_rel_per_K: body.alpha_rel_per_K as number,
        beta_rel_per_K: body.beta_rel_per_K as number,
        rs_ohm: body.rs_ohm as number,
        kappa_ohm_per_K: body.kappa_ohm_per_K as number,
        a_irradiance: body.a_irradiance as number,
        voc1_V: row.metrics.voc_v,
      };
    }
    const t = translateCurve(measured, request);
    const area_m2 = cond.area_cm2 != null ? cond.area_cm2 * 1e-4 : null;
    const best = t.modelFigures
      ? { isc_a: t.modelFigures.isc_a, voc_v: t.modelFigures.voc_v, pmp_w: t.modelFigures.pmp_w, imp_a: t.modelFigures.imp_a, vmp_v: t.modelFigures.vmp_v, ff: t.modelFigures.ff }
      : t.figures
        ? { isc_a: t.figures.isc_a, voc_v: t.figures.voc_v, pmp_w: t.figures.pmp_w, imp_a: t.figures.imp_a, vmp_v: t.figures.vmp_v, ff: t.figures.ff }
        : null;
    const out = {
      method: t.method,
      from,
      to: t.to,
      figures: best ? { ...best, efficiency: area_m2 ? best.pmp_w / (t.to.irradiance_Wm2 * area_m2) : null } : null,
      figuresSource: t.modelFigures ? 'model' : best ? 'curve' : null,
      figuresError: t.figuresError ?? null,
      measured: { conditions: from, figures: row.metrics, curve: thinCurve(measured) },
      params: t.params ?? null,
      curve: thinCurve(t.curve),
      points_total: t.curve.voltage_V.length,
      notes: [...notes, ...t.notes],
    };
    assertFiniteJson(out);
    res.json(out);
  });

  r.use(physicsErrors);
  return r;
}
