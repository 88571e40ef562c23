/** Device physics: material figures, band diagrams, the physics of a fitted curve, translations. */
import { keepPreviousData, useMutation, useQuery } from '@tanstack/react-query';
import { apiFetch } from '@/lib/api/client';
import { physicsKeys } from '@/lib/api/keys';
import type { CurveMeta, DoubleDiodeParams, Metrics, SingleDiodeParams } from '@/lib/iv/types';
import type { BandDiagram, OccupationCurve, RecombinationShares, VocTempCoefficient } from '@/lib/physics';
import type { BandDiagramRequest, TranslateRequest, TranslationMethod } from '@/lib/schemas/physics';
import type { StcFigures } from '@/lib/schemas/curves';

/** GET /api/physics/material. */
export type MaterialJson = {
  tempK: number;
  tempC: number;
  ni_cm3: number;
  eg_ev: number;
  nc_cm3: number;
  nv_cm3: number;
  egDos_eV: number;
  kT_eV: number;
  material: { id: string; name: string; tempRangeK: { min: number; max: number }; maxDoping_cm3: number; sources: Record<string, string> };
  reference: { tempK: number; ni_cm3: number; source: string; modelAtReference_cm3: number };
  series: { tempK: number[]; ni_cm3: number[] };
};

type Levels = { ef_eV: number; efn_eV: number; efp_eV: number; n0_cm3: number; p0_cm3: number; splitting_eV: number; impliedVoc_V: number };

/** POST /api/physics/band-diagram. */
export type BandDiagramJson = {
  input: { type: 'p' | 'n'; doping_cm3: number; excess_cm3: number; tempK: number };
  material: { name: string; eg_ev: number; egDos_eV: number; ni_cm3: number; kT_eV: number };
  diagram: BandDiagram;
  fermiDirac: Levels & { n_cm3: number; p_cm3: number; etaN: number; etaP: number };
  boltzmann: Levels;
  difference: { splitting_eV: number; impliedVoc_V: number };
  degenerate: boolean;
  occupation: OccupationCurve;
};

/** GET /api/physics/curves/:id. */
export type CurvePhysicsJson = {
  curve: { id: string; device_id: string; batch: { id: string; name: string } | null; meta: CurveMeta; metrics: Metrics };
  conditions: { tempC: number; cells: number; irradiance_Wm2: number | null; area_cm2: number | null; cellArea_cm2: number | null };
  stc: StcFigures | null;
  single: {
    params: SingleDiodeParams;
    j0_A_per_cm2: number | null;
    impliedVoc: { voc_V: number; jsc_A_per_cm2: number | null; isc_a: number; measuredVoc_V: number } | null;
    coefficient: VocTempCoefficient | null;
    coefficientDeSoto: VocTempCoefficient | null;
    vocVsTemperature: { law: string; points: { tempC: number; voc_V: number }[] } | null;
  } | null;
  double: { params: DoubleDiodeParams; j01_A_per_cm2: number | null; j02_A_per_cm2: number | null; shares: RecombinationShares | null } | null;
  notes: string[];
};

export type TranslatedFigures = { isc_a: number; voc_v: number; pmp_w: number; imp_a: number; vmp_v: number; ff: number; efficiency: number | null };

/** POST /api/physics/curves/:id/translate. */
export type TranslationJson = {
  method: TranslationMethod;
  from: { irradiance_Wm2: number; tempC: number };
  to: { irradiance_Wm2: number; tempC: number };
  figures: TranslatedFigures | null;
  figuresSource: 'model' | 'curve' | null;
  figuresError: string | null;
  measured: { conditions: { irradiance_Wm2: number; tempC: number }; figures: Metrics; curve: { voltage_V: number[]; current_A: number[] } };
  params: SingleDiodeParams | null;
  curve: { voltage_V: number[]; current_A: number[] };
  points_total: number;
  notes: string[];
};

export { physicsKeys };

/** Silicon's n_i, Eg, Nc, Nv at tempK and n_i over 200–400 K; the previous answer stays while the next loads. */
export function useMaterial(tempK: number | null) {
  return useQuery({
    queryKey: physicsKeys.material(tempK ?? 0),
    queryFn: () => apiFetch<MaterialJson>(`/api/physics/material?tempK=${encodeURIComponent(String(tempK))}`),
    enabled: tempK != null,
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

/** The physics of a curve's current fits. */
export function useCurvePhysics(id: string | null) {
  return useQuery({
    queryKey: physicsKeys.curve(id ?? ''),
    queryFn: () => apiFetch<CurvePhysicsJson>(`/api/physics/curves/${encodeURIComponent(String(id))}`),
    enabled: !!id,
  });
}

/** Translate a curve to other conditions (nothing is stored, so nothing to invalidate). */
export function useTranslate(id: string) {
  return useMutation({
    mutationFn: (input: TranslateRequest) => apiFetch<TranslationJson>(`/api/physics/curves/${encodeURIComponent(id)}/translate`, { body: input as Record<string, unknown> }),
  });
}
