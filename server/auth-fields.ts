/**
 * The rules for what better-auth stores about a person, applied in its database hooks so that
 * every way in (sign-up, update-user, the admin's and the organisation plugin's endpoints) keeps
 * them: the display name is the sign-up form's rule (lib/schemas/auth.ts), the image a short
 * address. A broken rule is a 400 `{ code, message }` naming the field.
 */
import { APIError } from 'better-auth/api';
import { displayNameSchema } from '@/lib/schemas/auth';
import { textProblem } from '@/lib/schemas/text';

/** Longest image address kept. */
const MAX_IMAGE_CHARS = 2048;

/** Checks the fields a user create or update carries; returns them with the name trimmed. */
export function checkUserFields<T extends { name?: unknown; image?: unknown }>(data: T): T {
  const out = { ...data };
  if (data.name !== undefined) {
    const r = displayNameSchema.safeParse(data.name);
    if (!r.success) throw new APIError('BAD_REQUEST', { code: 'invalid_input', message: r.error.issues[0]?.message ?? 'Name is not valid.' });
    out.name = r.data;
  }
  if (typeof data.image === 'string') {
    const problem = textProblem(data.image, { max: MAX_IMAGE_CHARS });
    if (problem) throw new APIError('BAD_REQUEST', { code: 'invalid_input', message: `Image ${problem}.` });
  }
  return out;
}
