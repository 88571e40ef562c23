/**
 * Sign-in, sessions and organisation roles through better-auth (e-mail + password, the
 * organization plugin with Quasilevel's own roles through its access control).
 *
 * Trust: a sign-up creates an unverified account and mails a verification link; sign-up answers
 * the same whether or not the address has an account (its owner is mailed instead). Only a
 * verified address is placed in an organisation (server/services/membership.ts). Passwords follow
 * lib/auth/password.ts on sign-up, reset and change; a reset ends every session of the account;
 * failed sign-ins slow down per account (server/services/sign-in-throttle.ts) and per client.
 */
import { apiKey as apiKeyPlugin } from '@better-auth/api-key';
import { betterAuth } from 'better-auth';
import { drizzleAdapter } from 'better-auth/adapters/drizzle';
import { APIError, createAuthMiddleware, isAPIError } from 'better-auth/api';
import { organization as organizationPlugin } from 'better-auth/plugins';
import { createAccessControl } from 'better-auth/plugins/access';
import type { Db } from '@/db/client';
import * as schema from '@/db/schema';
import { loadPasswordChecker, passwordProblem, PASSWORD_MAX_LENGTH, PASSWORD_MIN_LENGTH } from '@/lib/auth/password';
import { ROLE_PERMISSIONS, ROLES, STATEMENTS } from '@/lib/auth/roles';
import type { Role } from '@/lib/auth/roles';
import { checkUserFields } from '@/server/auth-fields';
import type { Mailer } from '@/server/mail';
import { existingAccountMail, verifyEmailMail } from '@/server/services/account-mails';
import { placeVerifiedUser } from '@/server/services/membership';
import { clearSignInFailures, recordSignInFailure, signInBlockedUntil } from '@/server/services/sign-in-throttle';

/** better-auth's own organisation statements, granted to our admin role only. */
const ORG_STATEMENTS = {
  organization: ['update', 'delete'],
  member: ['create', 'update', 'delete'],
  invitation: ['create', 'cancel'],
  team: ['create', 'update', 'delete'],
  ac: ['create', 'read', 'update', 'delete'],
} as const;

const ac = createAccessControl({ ...ORG_STATEMENTS, ...STATEMENTS });

function roleStatements(role: Role) {
  const grants: Record<string, string[]> = {};
  for (const p of ROLE_PERMISSIONS[role]) {
    const [res, action] = p.split(':');
    (grants[res] ??= []).push(action);
  }
  if (role === 'admin') {
    for (const [res, actions] of Object.entries(ORG_STATEMENTS)) grants[res] = [...actions];
  }
  return grants;
}

const roles = Object.fromEntries(
  ROLES.map((r) => [r, ac.newRole(roleStatements(r) as Parameters<typeof ac.newRole>[0])]),
) as Record<Role, ReturnType<typeof ac.newRole>>;

export type AuthConfig = {
  db: Db;
  mailer: Mailer;
  baseURL: string;
  secret: string;
  trustedOrigins?: string[];
  /** Sign-in attempts per minute per client address; 0 disables the limit (some tests). */
  signInPerMinute?: number;
  /** Session lifetime in seconds. */
  sessionSeconds?: number;
  /** better-auth's own log level; tests pass 'error' to keep expected warnings out of the output. */
  logLevel?: 'debug' | 'info' | 'warn' | 'error';
};

/** Where the verification link leads after it has run: the app (signed in) or the sign-in screen with a message. */
export const VERIFIED_CALLBACK = '/sign-in?verified=1';

/** The endpoints that set a new password, and the body field holding it. */
const NEW_PASSWORD_FIELD: Record<string, string> = { '/sign-up/email': 'password', '/reset-password': 'newPassword', '/change-password': 'newPassword' };

type Body = Record<string, unknown> | undefined;
const text = (v: unknown) => (typeof v === 'string' ? v : '');

export function createAuth(cfg: AuthConfig) {
  return buildAuth(cfg) as Auth;
}

function buildAuth(cfg: AuthConfig) {
  const perMinute = cfg.signInPerMinute ?? 10;
  return betterAuth({
    baseURL: cfg.baseURL,
    basePath: '/api/auth',
    logger: { level: cfg.logLevel ?? 'warn' },
    secret: cfg.secret,
    trustedOrigins: cfg.trustedOrigins ?? [],
    database: drizzleAdapter(cfg.db, { provider: 'pg', schema }),
    emailAndPassword: {
      enabled: true,
      minPasswordLength: PASSWORD_MIN_LENGTH,
      maxPasswordLength: PASSWORD_MAX_LENGTH,
      // No session at sign-up: the verification link signs in. This also makes better-auth answer a
      // sign-up with a taken address exactly like a new one, and call onExistingUserSignUp.
      autoSignIn: false,
      revokeSessionsOnPasswordReset: true,
      onExistingUserSignUp: async ({ user }) => {
        await cfg.mailer.send({ to: user.email, ...existingAccountMail(user.name, cfg.baseURL) });
      },
      resetPasswordTokenExpiresIn: 60 * 60,
      sendResetPassword: async ({ user, url }) => {
        await cfg.mailer.send({
          to: user.email,
          kind: 'password-reset',
          subject: 'Quasilevel: reset your password',
          text: [
            `Hello ${user.name},`,
            '',
            'Someone (we hope you) asked to reset the password of your Quasilevel account.',
            'Open this link within one hour to choose a new password:',
            '',
            url,
            '',
            'If you did not ask for this, ignore this message: your password stays as it is.',
          ].join('\n'),
        });
      },
    },
    emailVerification: {
      sendOnSignUp: true,
      autoSignInAfterVerification: true,
      expiresIn: 24 * 60 * 60,
      sendVerificationEmail: async ({ user, url }) => {
        // One landing place whatever the client asked for (the link is opened in a fresh tab).
        const link = new URL(url);
        link.searchParams.set('callbackURL', VERIFIED_CALLBACK);
        await cfg.mailer.send({ to: user.email, ...verifyEmailMail(user.name, link.toString()) });
      },
      afterEmailVerification: async (user) => {
        await placeVerifiedUser(cfg.db, cfg.mailer, cfg.baseURL, user);
      },
    },
    hooks: {
      before: createAuthMiddleware(async (ctx) => {
        const body = ctx.body as Body;
        const field = NEW_PASSWORD_FIELD[ctx.path];
        if (field && typeof body?.[field] === 'string') {
          const problem = passwordProblem(await loadPasswordChecker(), body[field] as string, [text(body.email), text(body.name)].filter(Boolean));
          if (problem) throw new APIError('BAD_REQUEST', { code: 'WEAK_PASSWORD', message: problem });
        }
        if (ctx.path === '/sign-in/email' && text(body?.email)) {
          const until = await signInBlockedUntil(cfg.db, text(body?.email));
          if (until) {
            const seconds = Math.max(1, Math.ceil((until.getTime() - Date.now()) / 1000));
            throw new APIError(
              'TOO_MANY_REQUESTS',
              {
                code: 'ACCOUNT_SLOWED_DOWN',
                message: `Too many failed sign-ins for this e-mail address. Try again in ${Math.ceil(seconds / 60)} minute${seconds > 60 ? 's' : ''} (after ${until.toISOString().slice(11, 16)} UTC).`,
                retry_at: until.toISOString(),
              },
              { 'Retry-After': String(seconds) },
            );
          }
        }
      }),
      after: createAuthMiddleware(async (ctx) => {
        if (ctx.path !== '/sign-in/email') return;
        const email = text((ctx.body as Body)?.email);
        if (!email) return;
        const returned = ctx.context.returned;
        if (isAPIError(returned)) {
          if (returned.statusCode === 401) await recordSignInFailure(cfg.db, email);
        } else {
          await clearSignInFailures(cfg.db, email);
        }
      }),
    },
    session: {
      expiresIn: cfg.sessionSeconds ?? 60 * 60 * 12,
      updateAge: 60 * 60,
    },
    rateLimit: {
      enabled: perMinute > 0,
      storage: 'memory',
      window: 60,
      max: 300,
      customRules: perMinute > 0 ? { '/sign-in/email': { window: 60, max: perMinute } } : {},
    },
    advanced: {
      // The Express layer writes the socket's address into this header (any client-sent
      // value is dropped), so the sign-in limit cannot be dodged with a forged header.
      ipAddress: { ipAddressHeaders: ['x-quasilevel-client-ip'] },
      defaultCookieAttributes: { httpOnly: true, sameSite: 'lax' },
    },
    databaseHooks: {
      user: {
        // Name and image rules for every way a user is written (server/auth-fields.ts).
        create: {
          before: async (u) => ({ data: checkUserFields(u) }),
        },
        update: { before: async (u) => ({ data: checkUserFields(u) }) },
      },
    },
    plugins: [
      // Station keys (server/services/stations.ts): owned by the organisation, created and
      // revoked only through /api/stations (its own /api/auth/api-key/* endpoints are closed in
      // server/app.ts), checked by server/station-keys.ts. No per-key rate limit: a line's tester
      // sends a file a minute all shift; no session from a key (the guard builds the caller).
      apiKeyPlugin({
        references: 'organization',
        apiKeyHeaders: 'x-api-key',
        defaultPrefix: 'qls_',
        maximumNameLength: 80,
        requireName: true,
        rateLimit: { enabled: false },
        enableSessionForAPIKeys: false,
      }),
      organizationPlugin({
        ac,
        roles,
        creatorRole: 'admin',
        allowUserToCreateOrganization: false,
        schema: {
          organization: { additionalFields: { domain: { type: 'string', required: true, input: true } } },
        },
      }),
    ],
  });
}

export type Auth = ReturnType<typeof buildAuth>;
