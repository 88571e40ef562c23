/** Form and request schemas for accounts, shared by the screens and the server. */
import { z } from 'zod';
import { ROLES } from '@/lib/auth/roles';
import { safeText } from '@/lib/schemas/text';

/** Longest display name (sign-up, account changes; better-auth's hooks apply the same rule). */
export const MAX_NAME_CHARS = 120;
/** The display-name rule, shared by the sign-up form and the server's better-auth hooks. */
export const displayNameSchema = safeText('Name', { min: 1, max: MAX_NAME_CHARS, missing: 'Enter your name.' });

export const signInSchema = z.object({
  email: z.email('Enter an e-mail address.'),
  password: z.string().min(1, 'Enter your password.'),
});
export type SignInInput = z.infer<typeof signInSchema>;

export const signUpSchema = z.object({
  name: displayNameSchema,
  email: z.email('Enter an e-mail address.'),
  password: z.string().min(8, 'Use at least 8 characters.').max(128),
});
export type SignUpInput = z.infer<typeof signUpSchema>;

export const forgotPasswordSchema = z.object({ email: z.email('Enter an e-mail address.') });

export const resetPasswordSchema = z.object({
  password: z.string().min(8, 'Use at least 8 characters.').max(128),
});

export const roleChangeSchema = z.object({
  role: z.enum(ROLES, { message: `Role must be one of ${ROLES.join(', ')}.` }),
});
export type RoleChangeInput = z.infer<typeof roleChangeSchema>;
