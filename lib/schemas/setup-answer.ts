/**
 * The answers of /api/setups (measurement setups with their uncertainty budgets) and the setup a
 * batch's evaluation names; part of the API's answer schemas (lib/schemas/responses.ts re-exports them).
 */
import { z } from 'zod';

/** A date as JSON carries it (ISO text); the server's Date objects serialize to it. */
const stamp = z.union([z.string(), z.date()]).transform((v) => (typeof v === 'string' ? v : v.toISOString()));

export const setupComponentSchema = z.strictObject({
  name: z.string(),
  acts_on: z.enum(['pmp', 'isc', 'voc', 'irradiance', 'temperature']),
  value: z.number(),
  unit: z.enum(['%', 'K']),
  distribution: z.enum(['normal', 'rectangular']),
  k: z.number().optional(),
});
export const setupSchema = z.strictObject({
  id: z.string(),
  name: z.string(),
  is_default: z.boolean(),
  components: z.array(setupComponentSchema),
  /** Expanded (k = 2) relative uncertainties, %, with typical crystalline-silicon temperature coefficients. */
  u_pmp_pct_k2: z.number(),
  u_isc_pct_k2: z.number(),
  u_voc_pct_k2: z.number(),
  created_at: stamp,
  updated_at: stamp,
});
export const setupListSchema = z.strictObject({ setups: z.array(setupSchema) });
/** A batch's setup as its evaluation names it, with the budget under the batch's own coefficients. */
export const setupRefSchema = z.strictObject({ id: z.string(), name: z.string(), u_pmp_pct_k2: z.number(), u_isc_pct_k2: z.number(), u_voc_pct_k2: z.number() });
export type SetupOut = z.input<typeof setupSchema>;
export type Setup = z.infer<typeof setupSchema>;
export type SetupList = z.infer<typeof setupListSchema>;
export type SetupComponent = z.infer<typeof setupComponentSchema>;
