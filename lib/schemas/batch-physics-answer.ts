/** The batch physics answer's schema (GET /api/physics/batches/:id; kept apart from responses.ts, which holds the others). */
import { z } from 'zod';

const num = z.number().nullable();
const spread = z.strictObject({ median: z.number(), p25: z.number(), p75: z.number(), min: z.number(), max: z.number() }).nullable();

/** One curve of the batch: J0 per cell area and the implied Voc (at the fit temperature and at 25 °C), or why not (`reason`). */
export const batchPhysicsDeviceSchema = z.strictObject({
  device_id: z.string(),
  curve_id: z.string(),
  temp_c: num,
  cells: num,
  cell_area_cm2: num,
  n: num,
  isc_a: z.number(),
  jsc_a_cm2: num,
  j0_a_cm2: num,
  j0_25c_a_cm2: num,
  measured_voc_v: z.number(),
  implied_voc_v: num,
  implied_voc_25c_v: num,
  reason: z.string().nullable(),
});

/** GET /api/physics/batches/:id (lib/physics/batch-report.ts). */
export const batchPhysicsAnswerSchema = z.strictObject({
  batch: z.strictObject({ id: z.string(), name: z.string(), cells: num, area_cm2: num }),
  basis: z.string(),
  devices: z.array(batchPhysicsDeviceSchema),
  summary: z.strictObject({
    total: z.number(),
    usable: z.number(),
    j0_a_cm2: spread,
    j0_25c_a_cm2: spread,
    implied_voc_v: spread,
    implied_voc_25c_v: spread,
  }),
});
export type BatchPhysicsAnswer = z.infer<typeof batchPhysicsAnswerSchema>;
