/**
 * Station keys: the request body of POST /api/stations and the answers of /api/stations
 * (strict, like lib/schemas/responses.ts; kept apart so that file stays under 400 lines).
 */
import { z } from 'zod';
import { safeText } from '@/lib/schemas/text';
import '@/lib/schemas/zod-setup';

export const stationCreateSchema = z.strictObject({
  name: safeText('The station name', { max: 80, min: 1, missing: 'Name the station (for example “Line 2 flasher”).' }),
});

const stamp = z.union([z.string(), z.date()]).transform((v) => (typeof v === 'string' ? v : v.toISOString()));

export const stationSchema = z.strictObject({
  id: z.string(),
  name: z.string(),
  /** The first characters of the key, so a person can tell keys apart; never the key. */
  key_start: z.string().nullable(),
  created_at: stamp,
  last_used_at: stamp.nullable(),
  revoked: z.boolean(),
});
export const stationListSchema = z.strictObject({ stations: z.array(stationSchema) });
/** The answer to a creation: the only time the key itself is shown. */
export const stationCreatedSchema = z.strictObject({ id: z.string(), name: z.string(), key: z.string() });

export type StationOut = z.input<typeof stationSchema>;
export type Station = z.infer<typeof stationSchema>;
export type StationList = z.infer<typeof stationListSchema>;
export type StationCreated = z.infer<typeof stationCreatedSchema>;
