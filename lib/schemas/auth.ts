/** Form and request schemas for accounts, shared by the screens and the server. */
import { z } from 'zod';
import { loadPasswordChecker, passwordProblem, PASSWORD_MAX_LENGTH, PASSWORD_MIN_LENGTH } from '@/lib/auth/password';
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

/** Length only; the strength rule needs the dictionaries and is checked by `checkNewPassword`. */
const newPassword = z
  .string()
  .min(PASSWORD_MIN_LENGTH, `The password needs at least ${PASSWORD_MIN_LENGTH} characters.`)
  .max(PASSWORD_MAX_LENGTH, `The password may have at most ${PASSWORD_MAX_LENGTH} characters.`);

/**
 * Adds the strength rule of lib/auth/password.ts to a form's password field (asynchronous: the
 * dictionaries load on first use), naming the reason the server would give.
 */
async function checkNewPassword(password: string, userInputs: string[], ctx: z.RefinementCtx, path: string) {
  if (password.length < PASSWORD_MIN_LENGTH || password.length > PASSWORD_MAX_LENGTH) return;
  const problem = passwordProblem(await loadPasswordChecker(), password, userInputs);
  if (problem) ctx.addIssue({ code: 'custom', path: [path], message: problem });
}

export const signUpSchema = z
  .object({
    name: displayNameSchema,
    email: z.email('Enter an e-mail address.'),
    password: newPassword,
  })
  .superRefine((v, ctx) => checkNewPassword(v.password, [v.email, v.name], ctx, 'password'));
export type SignUpInput = z.infer<typeof signUpSchema>;

export const forgotPasswordSchema = z.object({ email: z.email('Enter an e-mail address.') });

export const resetPasswordSchema = z
  .object({ password: newPassword })
  .superRefine((v, ctx) => checkNewPassword(v.password, [], ctx, 'password'));

const role = z.enum(ROLES, { message: `Role must be one of ${ROLES.join(', ')}.` });

export const roleChangeSchema = z.object({ role });
export type RoleChangeInput = z.infer<typeof roleChangeSchema>;

/** PATCH /api/users/:id/active — deactivate (false) or reactivate (true) a member. */
export const memberActiveSchema = z.object({ active: z.boolean({ message: 'active must be true or false.' }) });

/** POST /api/invitations — invite an address with a role. */
export const inviteSchema = z.object({ email: z.email('Enter the e-mail address to invite.'), role });
export type InviteInput = z.infer<typeof inviteSchema>;

/** POST /api/membership-requests/:id/decision — approve with a role, or refuse. */
export const requestDecisionSchema = z.discriminatedUnion(
  'decision',
  [z.object({ decision: z.literal('approve'), role }), z.object({ decision: z.literal('refuse') })],
  { message: 'decision must be approve (with a role) or refuse.' },
);
export type RequestDecisionInput = z.infer<typeof requestDecisionSchema>;

/**
 * PATCH /api/organization — the administrators' settings: joining by e-mail domain, and the
 * separation of duties at release. Either or both; an empty body is refused.
 */
export const organisationSettingsSchema = z
  .strictObject({
    join_by_domain: z.boolean({ message: 'Joining by e-mail domain must be on (true) or off (false).' }).optional(),
    separate_release: z.boolean({ message: 'Separate release must be on (true) or off (false).' }).optional(),
    retention_years: z
      .number({ message: 'Retention must be a whole number of years.' })
      .int({ message: 'Retention must be a whole number of years.' })
      .min(1, { message: 'Retention must be at least 1 year.' })
      .max(100, { message: 'Retention must be at most 100 years.' })
      .optional(),
  })
  .refine((s) => s.join_by_domain !== undefined || s.separate_release !== undefined || s.retention_years !== undefined, {
    message: 'Name a setting to change: join_by_domain, separate_release or retention_years.',
  });
export type OrganisationSettingsInput = z.infer<typeof organisationSettingsSchema>;
