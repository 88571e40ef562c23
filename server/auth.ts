/**
 * Sign-in, sessions and organisation roles through better-auth (e-mail + password, the
 * organization plugin with Quasilevel's own roles through its access control).
 * Sign-up joins the organisation that owns the e-mail's domain as test engineer, or founds a new
 * organisation for a new domain and becomes its admin.
 */
import { betterAuth } from 'better-auth';
import { drizzleAdapter } from 'better-auth/adapters/drizzle';
import { organization as organizationPlugin } from 'better-auth/plugins';
import { createAccessControl } from 'better-auth/plugins/access';
import { eq } from 'drizzle-orm';
import type { Db } from '@/db/client';
import * as schema from '@/db/schema';
import { ROLE_PERMISSIONS, ROLES, STATEMENTS } from '@/lib/auth/roles';
import type { Role } from '@/lib/auth/roles';
import { checkUserFields } from '@/server/auth-fields';
import type { Mailer } from '@/server/mail';

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

/** Lower-cased domain of an e-mail address, or null when it has none. */
export function emailDomain(email: string): string | null {
  const at = email.lastIndexOf('@');
  if (at < 0) return null;
  const d = email.slice(at + 1).trim().toLowerCase();
  return d || null;
}

/** Makes a URL-safe slug from a domain; uniqueness is the domain's. */
function slugFor(domain: string): string {
  return domain.replace(/[^a-z0-9]+/g, '-').replace(/^-|-$/g, '') || 'org';
}

/** Puts a new user into the organisation of their e-mail domain (or founds it). */
export async function placeNewUser(db: Db, u: { id: string; email: string }): Promise<void> {
  const domain = emailDomain(u.email);
  if (!domain) return;
  await db.transaction(async (tx) => {
    const [org] = await tx.select().from(schema.organization).where(eq(schema.organization.domain, domain));
    if (org) {
      await tx.insert(schema.member).values({ id: crypto.randomUUID(), organizationId: org.id, userId: u.id, role: 'test_engineer' });
      return;
    }
    const orgId = crypto.randomUUID();
    await tx.insert(schema.organization).values({ id: orgId, name: domain, slug: slugFor(domain), domain });
    await tx.insert(schema.member).values({ id: crypto.randomUUID(), organizationId: orgId, userId: u.id, role: 'admin' });
  });
}

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
      minPasswordLength: 8,
      maxPasswordLength: 128,
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
          after: async (u) => {
            await placeNewUser(cfg.db, u);
          },
        },
        update: { before: async (u) => ({ data: checkUserFields(u) }) },
      },
    },
    plugins: [
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

type BaseAuth = ReturnType<typeof buildAuth>;

/** The organization plugin's endpoint we call from our own routes (its inferred type is lost in the generic). */
type OrgApi = {
  updateMemberRole: (req: { headers: Headers; body: { memberId: string; role: string; organizationId: string } }) => Promise<unknown>;
};

export type Auth = BaseAuth & { api: BaseAuth['api'] & OrgApi };
