/** Request schemas for specs, reviews and comparisons, shared by the screens and the server. */
import { z } from 'zod';
import { specInputSchema } from '@/lib/quality/spec';
import { safeText } from '@/lib/schemas/text';

const id = (message: string) => z.string().min(1, message).max(100, 'An id is at most 100 characters.');
const comment = safeText('Comment', { max: 2000, multiline: true });

/**
 * A new spec, or (with family_id) a new version of an existing one; `base_version` is the version
 * the edit started from, so a save on top of someone else's newer version is refused (409).
 */
export const specSaveSchema = specInputSchema
  .extend({
    family_id: id('Choose the spec to make a new version of.').optional(),
    base_version: z.number({ message: 'Say which version this edit started from.' }).int().min(1).optional(),
  })
  .refine((s) => !s.family_id || s.base_version != null, { message: 'Say which version this edit started from.', path: ['base_version'] });

export const submitSchema = z.object({ comment: comment.optional() });

export const decisionSchema = z
  .object({
    decision: z.enum(['release', 'hold'], { message: 'decision must be "release" or "hold".' }),
    spec_id: id('Choose the spec version the batch was judged against.'),
    comment: comment.optional().default(''),
  })
  .refine((d) => d.decision !== 'hold' || d.comment.length > 0, { message: 'Say why the batch is held.', path: ['comment'] });

/** Reopening a released batch: the reason is kept in its review record. */
export const reopenSchema = z.object({
  reason: z.string({ message: 'Write why the released batch is reopened.' }).trim().min(1, 'Write why the released batch is reopened.').max(2000),
});

export const compareQuerySchema = z.object({
  batches: z
    .string()
    .min(1, 'Choose at least one batch.')
    .transform((s) => [...new Set(s.split(',').map((x) => x.trim()).filter(Boolean))])
    .refine((a) => a.length >= 1 && a.length <= 20, 'Choose from 1 to 20 batches.'),
  spec: z.string().optional(),
  param: z.string().optional().default('pmp_w'),
});
