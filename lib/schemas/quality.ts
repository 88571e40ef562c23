/** Request schemas for specs, reviews and comparisons, shared by the screens and the server. */
import { z } from 'zod';
import { specInputSchema } from '@/lib/quality/spec';
import { safeText } from '@/lib/schemas/text';

const id = (message: string) => z.string().min(1, message).max(100, 'An id is at most 100 characters.');
const comment = safeText('Comment', { max: 2000, multiline: true });

/** A new spec, or (with familyId) a new version of an existing one. */
export const specSaveSchema = specInputSchema.extend({ familyId: id('Choose the spec to make a new version of.').optional() });

export const submitSchema = z.object({ comment: comment.optional() });

export const decisionSchema = z
  .object({
    decision: z.enum(['release', 'hold'], { message: 'decision must be "release" or "hold".' }),
    specId: id('Choose the spec version the batch was judged against.'),
    comment: comment.optional().default(''),
  })
  .refine((d) => d.decision !== 'hold' || d.comment.length > 0, { message: 'Say why the batch is held.', path: ['comment'] });

export const compareQuerySchema = z.object({
  batches: z
    .string()
    .min(1, 'Choose at least one batch.')
    .transform((s) => [...new Set(s.split(',').map((x) => x.trim()).filter(Boolean))])
    .refine((a) => a.length >= 1 && a.length <= 20, 'Choose from 1 to 20 batches.'),
  spec: z.string().optional(),
  param: z.string().optional().default('pmp_w'),
});
