/** Device physics: material figures, band diagrams, the physics of a fitted curve, translations. */
import { keepPreviousData, useMutation, useQuery } from '@tanstack/react-query';
import { apiFetch } from '@/lib/api/client';
import { batchKeys, physicsKeys } from '@/lib/api/keys';
import type { BatchPhysicsAnswer } from '@/lib/schemas/batch-physics-answer';
import type { CurveMeta, DoubleDiodeParams, Metrics, SingleDiodeParams } from '@/lib/iv/types';
import type { BandDiagram, OccupationCurve, RecombinationShares, VocTempCoefficient } from '@/lib/physics';
import type { BandDiagramRequest, TranslateRequest, TranslationMethod } from '@/lib/schemas/physics';
import type { StcOutcome } from '@/lib/schemas/curves';

/** GET /api/physics/material. */
export type MaterialJson = {
  temp_k: number;
  temp_c: number;
  ni_cm3: number;
  eg_ev: number;
  nc_cm3: number;
  nv_cm3: number;
  eg_dos_ev: number;
  kt_ev: number;
  material: { id: string; name: string; temp_range_k: { min: number; max: number }; max_doping_cm3: number; sources: Record<string, string> };
  reference: { temp_k: number; ni_cm3: number; source: string; model_at_reference_cm3: number };
  series: { temp_k: number[]; ni_cm3: number[] };
};

type Levels = { ef_ev: number; efn_ev: number; efp_ev: number; n0_cm3: number; p0_cm3: number; splitting_ev: number; implied_voc_v: number };

/** POST /api/physics/band-diagram. */
export type BandDiagramJson = {
  input: { type: 'p' | 'n'; doping_cm3: number; excess_cm3: number; temp_k: number };
  material: { name: string; eg_ev: number; eg_dos_ev: number; ni_cm3: number; kt_ev: number };
  diagram: BandDiagram;
  fermi_dirac: Levels & { n_cm3: number; p_cm3: number; eta_n: number; eta_p: number };
  boltzmann: Levels;
  difference: { splitting_ev: number; implied_voc_v: number };
  degenerate: boolean;
  occupation: OccupationCurve;
};

/** GET /api/physics/curves/:id. */
export type CurvePhysicsJson = {
  curve: { id: string; device_id: string; batch: { id: string; name: string } | null; meta: CurveMeta; metrics: Metrics };
  conditions: { temp_c: number; cells: number; irradiance_w_m2: number | null; area_cm2: number | null; cell_area_cm2: number | null };
  stc: StcOutcome | null;
  single: {
    params: SingleDiodeParams;
    j0_a_cm2: number | null;
    implied_voc: { voc_v: number; jsc_a_cm2: number | null; isc_a: number; measured_voc_v: number } | null;
    coefficient: VocTempCoefficient | null;
    coefficient_de_soto: VocTempCoefficient | null;
    voc_vs_temperature: { law: string; points: { temp_c: number; voc_v: number }[] } | null;
  } | null;
  double: { params: DoubleDiodeParams; j01_a_cm2: number | null; j02_a_cm2: number | null; shares: RecombinationShares | null } | null;
  notes: string[];
};

export type TranslatedFigures = { isc_a: number; voc_v: number; pmp_w: number; imp_a: number; vmp_v: number; ff: number; efficiency: number | null };

/** POST /api/physics/curves/:id/translate. */
export type TranslationJson = {
  method: TranslationMethod;
  from: { irradiance_w_m2: number; temp_c: number };
  to: { irradiance_w_m2: number; temp_c: number };
  figures: TranslatedFigures | null;
  figures_source: 'model' | 'curve' | null;
  figures_error: string | null;
  measured: { conditions: { irradiance_w_m2: number; temp_c: number }; figures: Metrics; curve: { voltage_v: number[]; current_a: number[] } };
  params: SingleDiodeParams | null;
  curve: { voltage_v: number[]; current_a: number[] };
  points_total: number;
  notes: string[];
};

export { physicsKeys };

/** The query string of a range ("&from_k=200&to_k=400"), '' without one. */
const rangeQuery = (range: Record<string, number> | null) => (range ? Object.entries(range).map(([k, v]) => `&${k}=${encodeURIComponent(String(v))}`).join('') : '');

/** Silicon's n_i, Eg, Nc, Nv at temp_k and n_i over `range` (200–400 K without one); the previous answer stays while the next loads. */
export function useMaterial(temp_k: number | null, range: { from_k: number; to_k: number } | null = null) {
  return useQuery({
    queryKey: physicsKeys.material(temp_k ?? 0, range),
    queryFn: () => apiFetch<MaterialJson>(`/api/physics/material?temp_k=${encodeURIComponent(String(temp_k))}${rangeQuery(range)}`),
    enabled: temp_k != null,
    placeholderData: keepPreviousData,
    staleTime: Infinity,
  });
}

/** Band diagram of a doping and injection (null input: nothing asked yet). A pure computation, cached for good. */
export function useBandDiagram(input: BandDiagramRequest | null) {
  return useQuery({
    queryKey: physicsKeys.bandDiagram(input),
    queryFn: () => apiFetch<BandDiagramJson>('/api/physics/band-diagram', { body: input as Record<string, unknown> }),
    enabled: !!input,
    placeholderData: keepPreviousData,
    staleTime: Infinity,
  });
}

/** The physics of a curve's current fits, with Voc predicted over `range` (−40…+85 °C without one); the previous answer stays while another range loads. */
export function useCurvePhysics(id: string | null, range: { from_c: number; to_c: number } | null = null) {
  return useQuery({
    queryKey: physicsKeys.curve(id ?? '', range),
    queryFn: () => apiFetch<CurvePhysicsJson>(`/api/physics/curves/${encodeURIComponent(String(id))}${range ? `?${rangeQuery(range).slice(1)}` : ''}`),
    enabled: !!id,
    // Another range of the same curve keeps the page while it loads; another curve does not.
    placeholderData: (previous, previousQuery) => (previousQuery?.queryKey[1] === id ? previous : undefined),
  });
}

/** Translate a curve to other conditions (nothing is stored, so nothing to invalidate). */
export function useTranslate(id: string) {
  return useMutation({
    mutationFn: (input: TranslateRequest) => apiFetch<TranslationJson>(`/api/physics/curves/${encodeURIComponent(id)}/translate`, { body: input as Record<string, unknown> }),
  });
}

export type { BatchPhysicsAnswer };

/** J0 per cell area and the implied Voc of every device of batch `id`, with their medians and quartiles (null: no batch chosen). */
export function useBatchPhysics(id: string | null) {
  return useQuery({
    queryKey: batchKeys.physics(id ?? ''),
    queryFn: () => apiFetch<BatchPhysicsAnswer>(`/api/physics/batches/${encodeURIComponent(String(id))}`),
    enabled: !!id,
  });
}
