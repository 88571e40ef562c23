/** The characterisation answer's schema (kept apart from responses.ts, which holds the others). */
import { z } from 'zod';
import type { Characterisation } from '@/lib/analysis/characterise';

/** An object the engine's own type describes; only "is an object" is checked at run time. */
const engine = <T>() => z.custom<T>((v) => v !== null && typeof v === 'object');
const num = z.number().nullable();

/** GET /api/batches/:id/characterisation: the engine's answer (lib/analysis/characterise) for one device of the batch, or why there is none. */
export const characterisationAnswerSchema = z.strictObject({
  batch: z.strictObject({ id: z.string(), name: z.string() }),
  device_id: z.string().nullable(),
  devices: z.array(z.strictObject({ device_id: z.string(), curves: z.number() })),
  sources: z.array(z.strictObject({ curve_id: z.string(), file_name: z.string(), irradiance_w_m2: num, temp_c: num })),
  characterisation: engine<Characterisation>().nullable(),
  reason: z.string().nullable(),
});
export type CharacterisationAnswer = z.infer<typeof characterisationAnswerSchema>;
