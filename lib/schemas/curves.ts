/** Request schemas for batches, uploads and refits, shared by the screens and the server. */
import { z } from 'zod';
import { optNumber, optNumberOrNull } from '@/lib/schemas/numbers';
import { optDate, optSafeText, safeText } from '@/lib/schemas/text';
import { labelWithUnit } from '@/lib/vocabulary';

/** Figures of a curve translated to standard test conditions (from the fitted model). */
export type StcFigures = {
  method: 'model';
  from: { irradiance_w_m2: number; temp_c: number };
  isc_a: number;
  voc_v: number;
  pmp_w: number;
  imp_a: number;
  vmp_v: number;
  ff: number;
  efficiency: number | null;
  notes: string[];
};

export const batchFieldsSchema = z.object({
  product_type: optSafeText('Product type', { max: 120 }),
  supplier: optSafeText('Supplier', { max: 120 }),
  line: optSafeText('Line', { max: 60 }),
  lot: optSafeText('Lot', { max: 60 }),
  batch_date: optDate('Batch date'),
  // Named as the batch form labels them (the key table's label and unit).
  cells: optNumberOrNull(labelWithUnit('cells'), { min: 1, max: 1000, integer: true }),
  area_cm2: optNumberOrNull(labelWithUnit('area_cm2'), { min: 0.01, max: 100000 }),
  nameplate_w: optNumberOrNull(labelWithUnit('nameplate_w'), { min: 0.001, max: 5000 }),
  description: optSafeText('Description', { max: 2000, multiline: true }),
});

export const batchCreateSchema = batchFieldsSchema.extend({
  name: safeText('Name', { min: 1, max: 120, missing: 'Give the batch a name.' }),
});
export type BatchCreateInput = z.input<typeof batchCreateSchema>;

export const batchUpdateSchema = batchFieldsSchema.partial().extend({
  name: safeText('Name', { min: 1, max: 120, missing: 'Give the batch a name.' }).optional(),
  archived: z.boolean().optional(),
});

/** Form fields that may accompany an upload and override every file's metadata. */
export const uploadOverridesSchema = z.object({
  temp_c: optNumberOrNull(labelWithUnit('temp_c'), { min: -60, max: 150 }),
  irradiance_w_m2: optNumberOrNull(labelWithUnit('irradiance_w_m2'), { min: 1, max: 2000 }),
  cells: optNumberOrNull(labelWithUnit('cells'), { min: 1, max: 1000, integer: true }),
  area_cm2: optNumberOrNull(labelWithUnit('area_cm2'), { min: 0.01, max: 100000 }),
  on_duplicate: z.enum(['ask', 'replace', 'keep']).optional().default('ask'),
});

export const refitSchema = z.object({
  model: z.enum(['single', 'double', 'both']).optional().default('both'),
  idealities: z.enum(['fixed', 'free']).optional().default('fixed'),
  objective: z.enum(['true-current', 'implicit']).optional().default('true-current'),
  temp_c: optNumberOrNull(labelWithUnit('temp_c'), { min: -60, max: 150 }),
  irradiance_w_m2: optNumberOrNull(labelWithUnit('irradiance_w_m2'), { min: 1, max: 2000 }),
  cells: optNumberOrNull(labelWithUnit('cells'), { min: 1, max: 1000, integer: true }),
  area_cm2: optNumberOrNull(labelWithUnit('area_cm2'), { min: 0.01, max: 100000 }),
});
export type RefitInput = z.input<typeof refitSchema>;

/** Columns the batch table sorts by (server-side). */
export const CURVE_SORT_KEYS = ['device_id', 'isc_a', 'voc_v', 'pmp_w', 'ff', 'n', 'rs_ohm', 'rsh_ohm', 'stc_pmp_w', 'created_at'] as const;
export type CurveSortKey = (typeof CURVE_SORT_KEYS)[number];

export const curveListQuerySchema = z.object({
  page: optNumber('page', { min: 1, integer: true }).transform((v) => v ?? 1),
  page_size: optNumber('page_size', { min: 1, max: 500, integer: true }).transform((v) => v ?? 50),
  sort: z.enum(CURVE_SORT_KEYS).optional().default('device_id'),
  dir: z.enum(['asc', 'desc']).optional().default('asc'),
  q: z.string().trim().max(120).optional().default(''),
  flag: z.string().trim().max(60).optional(),
});
