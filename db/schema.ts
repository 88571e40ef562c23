/**
 * Quasilevel's tables. The first block is better-auth's schema (core + organization plugin),
 * written from better-auth's documented schema; field names are the ones better-auth expects.
 * The product's own tables follow. Every product record carries `organizationId`.
 */
import { boolean, doublePrecision, index, integer, json, jsonb, pgTable, text, timestamp, uniqueIndex } from 'drizzle-orm/pg-core';
import type { CurveMeta, FitResult, Flag, Metrics } from '@/lib/iv/types';
import type { StcOutcome } from '@/lib/schemas/curves';

// ---------------------------------------------------------------- better-auth core
export const user = pgTable('user', {
  id: text('id').primaryKey(),
  name: text('name').notNull(),
  email: text('email').notNull().unique(),
  emailVerified: boolean('email_verified').notNull().default(false),
  image: text('image'),
  createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
  updatedAt: timestamp('updated_at', { withTimezone: true }).notNull().defaultNow(),
});

export const session = pgTable(
  'session',
  {
    id: text('id').primaryKey(),
    expiresAt: timestamp('expires_at', { withTimezone: true }).notNull(),
    token: text('token').notNull().unique(),
    createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
    updatedAt: timestamp('updated_at', { withTimezone: true }).notNull().defaultNow(),
    ipAddress: text('ip_address'),
    userAgent: text('user_agent'),
    userId: text('user_id')
      .notNull()
      .references(() => user.id, { onDelete: 'cascade' }),
    activeOrganizationId: text('active_organization_id'),
  },
  (t) => [index('session_user_idx').on(t.userId)],
);

export const account = pgTable(
  'account',
  {
    id: text('id').primaryKey(),
    accountId: text('account_id').notNull(),
    providerId: text('provider_id').notNull(),
    userId: text('user_id')
      .notNull()
      .references(() => user.id, { onDelete: 'cascade' }),
    accessToken: text('access_token'),
    refreshToken: text('refresh_token'),
    idToken: text('id_token'),
    accessTokenExpiresAt: timestamp('access_token_expires_at', { withTimezone: true }),
    refreshTokenExpiresAt: timestamp('refresh_token_expires_at', { withTimezone: true }),
    scope: text('scope'),
    password: text('password'),
    createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
    updatedAt: timestamp('updated_at', { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [index('account_user_idx').on(t.userId)],
);

export const verification = pgTable('verification', {
  id: text('id').primaryKey(),
  identifier: text('identifier').notNull(),
  value: text('value').notNull(),
  expiresAt: timestamp('expires_at', { withTimezone: true }).notNull(),
  createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
  updatedAt: timestamp('updated_at', { withTimezone: true }).notNull().defaultNow(),
});

// ---------------------------------------------------------------- better-auth organization plugin
export const organization = pgTable('organization', {
  id: text('id').primaryKey(),
  name: text('name').notNull(),
  slug: text('slug').notNull().unique(),
  logo: text('logo'),
  metadata: text('metadata'),
  createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
  /** E-mail domain (lower case) whose sign-ups join this organisation. Quasilevel's own field. */
  domain: text('domain').notNull().unique(),
  /**
   * Whether a newcomer with a verified address at `domain` joins at once (as test engineer);
   * off, they ask to join and an administrator decides. Quasilevel's own field, set by admins.
   */
  joinByDomain: boolean('join_by_domain').notNull().default(false),
});

export const member = pgTable(
  'member',
  {
    id: text('id').primaryKey(),
    organizationId: text('organization_id')
      .notNull()
      .references(() => organization.id, { onDelete: 'cascade' }),
    userId: text('user_id')
      .notNull()
      .references(() => user.id, { onDelete: 'cascade' }),
    role: text('role').notNull().default('test_engineer'),
    createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
    /** Set while an administrator has deactivated the member (Quasilevel's own field): no access, records kept. */
    deactivatedAt: timestamp('deactivated_at', { withTimezone: true }),
  },
  (t) => [uniqueIndex('member_org_user_idx').on(t.organizationId, t.userId), index('member_user_idx').on(t.userId)],
);

export const invitation = pgTable('invitation', {
  id: text('id').primaryKey(),
  organizationId: text('organization_id')
    .notNull()
    .references(() => organization.id, { onDelete: 'cascade' }),
  email: text('email').notNull(),
  role: text('role'),
  status: text('status').notNull().default('pending'),
  expiresAt: timestamp('expires_at', { withTimezone: true }).notNull(),
  createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
  inviterId: text('inviter_id')
    .notNull()
    .references(() => user.id, { onDelete: 'cascade' }),
});

// ---------------------------------------------------------------- better-auth api-key plugin (@better-auth/api-key)
/**
 * Station keys (server/services/stations.ts): better-auth's API key table, written from the
 * plugin's schema (`apiKeySchema` in @better-auth/api-key). Keys reference an organisation
 * (`referenceId`); `key` holds the SHA-256 of the key, never the key. A revoked key is `enabled`
 * false and stays listed.
 */
export const apikey = pgTable(
  'apikey',
  {
    id: text('id').primaryKey(),
    configId: text('config_id').notNull().default('default'),
    name: text('name'),
    start: text('start'),
    referenceId: text('reference_id').notNull(),
    prefix: text('prefix'),
    key: text('key').notNull(),
    refillInterval: integer('refill_interval'),
    refillAmount: integer('refill_amount'),
    lastRefillAt: timestamp('last_refill_at', { withTimezone: true }),
    enabled: boolean('enabled').default(true),
    rateLimitEnabled: boolean('rate_limit_enabled').default(true),
    rateLimitTimeWindow: integer('rate_limit_time_window'),
    rateLimitMax: integer('rate_limit_max'),
    requestCount: integer('request_count').default(0),
    remaining: integer('remaining'),
    lastRequest: timestamp('last_request', { withTimezone: true }),
    expiresAt: timestamp('expires_at', { withTimezone: true }),
    createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
    updatedAt: timestamp('updated_at', { withTimezone: true }).notNull().defaultNow(),
    permissions: text('permissions'),
    metadata: text('metadata'),
  },
  (t) => [index('apikey_config_id_idx').on(t.configId), index('apikey_reference_id_idx').on(t.referenceId), index('apikey_key_idx').on(t.key)],
);

// ---------------------------------------------------------------- membership and trust
/**
 * A person with a verified address at an organisation's domain asking to join it (when the
 * organisation does not let its domain join by itself). One per person and organisation.
 */
export const membershipRequest = pgTable(
  'membership_request',
  {
    id: text('id').primaryKey(),
    organizationId: text('organization_id')
      .notNull()
      .references(() => organization.id, { onDelete: 'cascade' }),
    userId: text('user_id')
      .notNull()
      .references(() => user.id, { onDelete: 'cascade' }),
    /** pending | approved | refused */
    status: text('status').notNull().default('pending'),
    /** The role granted on approval. */
    role: text('role'),
    decidedBy: text('decided_by').references(() => user.id, { onDelete: 'set null' }),
    decidedAt: timestamp('decided_at', { withTimezone: true }),
    createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [uniqueIndex('membership_request_org_user_idx').on(t.organizationId, t.userId), index('membership_request_org_idx').on(t.organizationId, t.status)],
);

/** Who changed what about an organisation's members, and when (the admins' users screen lists it). */
export const auditLog = pgTable(
  'audit_log',
  {
    id: text('id').primaryKey(),
    organizationId: text('organization_id')
      .notNull()
      .references(() => organization.id, { onDelete: 'cascade' }),
    /** Null when the system acted (a verified newcomer joining by domain or invitation). */
    actorId: text('actor_id').references(() => user.id, { onDelete: 'set null' }),
    /** The actor's name and e-mail when it happened; kept when the account goes. */
    actorName: text('actor_name'),
    action: text('action').notNull(),
    subjectUserId: text('subject_user_id').references(() => user.id, { onDelete: 'set null' }),
    subjectName: text('subject_name'),
    subjectEmail: text('subject_email'),
    details: jsonb('details').$type<Record<string, string | boolean | null>>(),
    createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [index('audit_log_org_idx').on(t.organizationId, t.createdAt)],
);

/** Failed sign-ins by e-mail address (lower case), for the per-account slow-down; older rows are pruned. */
export const signInFailure = pgTable(
  'sign_in_failure',
  {
    id: text('id').primaryKey(),
    email: text('email').notNull(),
    createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [index('sign_in_failure_email_idx').on(t.email, t.createdAt)],
);

// ---------------------------------------------------------------- product tables
/** Every message the mail module sent (or wrote to the local outbox), for the admins' Outbox screen. */
export const mailLog = pgTable(
  'mail_log',
  {
    id: text('id').primaryKey(),
    organizationId: text('organization_id').references(() => organization.id, { onDelete: 'cascade' }),
    to: text('to').notNull(),
    subject: text('subject').notNull(),
    body: text('body').notNull(),
    kind: text('kind').notNull(),
    transport: text('transport').notNull(),
    file: text('file'),
    createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [index('mail_log_org_idx').on(t.organizationId, t.createdAt)],
);

/**
 * A measurement setup (tester, reference device, sensors) with its uncertainty budget: the
 * components (lib/quality/uncertainty.ts componentSchema) as JSON. One per organisation may be
 * the default, used by batches that name none.
 */
export const measurementSetup = pgTable(
  'measurement_setup',
  {
    id: text('id').primaryKey(),
    organizationId: text('organization_id')
      .notNull()
      .references(() => organization.id, { onDelete: 'cascade' }),
    name: text('name').notNull(),
    components: jsonb('components').$type<Record<string, unknown>[]>().notNull(),
    is_default: boolean('is_default').notNull().default(false),
    createdBy: text('created_by').references(() => user.id, { onDelete: 'set null' }),
    createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
    updatedAt: timestamp('updated_at', { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [index('measurement_setup_org_idx').on(t.organizationId)],
);

/** A batch of devices (cells or modules) measured together: one lot, one line, one day. */
export const batch = pgTable(
  'batch',
  {
    id: text('id').primaryKey(),
    organizationId: text('organization_id')
      .notNull()
      .references(() => organization.id, { onDelete: 'cascade' }),
    name: text('name').notNull(),
    product_type: text('product_type'),
    supplier: text('supplier'),
    line: text('line'),
    lot: text('lot'),
    /** Measurement date of the batch, ISO yyyy-mm-dd. */
    batch_date: text('batch_date'),
    /** Default cells in series for curves whose files do not say. */
    cells: integer('cells'),
    /** Default device area, cm², for efficiency. */
    area_cm2: doublePrecision('area_cm2'),
    nameplate_w: doublePrecision('nameplate_w'),
    /** Measurement irradiance, W/m², for curves whose files do not say (efficiency, STC). */
    irradiance_w_m2: doublePrecision('irradiance_w_m2'),
    /** The module type's temperature coefficients, %/K, and IEC 60891 procedure 1's Rs (Ω) and κ (Ω/K): lib/analysis/stc.ts. */
    alpha_pct_per_k: doublePrecision('alpha_pct_per_k'),
    beta_pct_per_k: doublePrecision('beta_pct_per_k'),
    gamma_pct_per_k: doublePrecision('gamma_pct_per_k'),
    rs_ohm: doublePrecision('rs_ohm'),
    kappa_ohm_per_k: doublePrecision('kappa_ohm_per_k'),
    /** The measurement setup whose uncertainty budget the batch's figures carry; null: the organisation's default setup. */
    setup_id: text('setup_id').references(() => measurementSetup.id, { onDelete: 'set null' }),
    description: text('description'),
    archived: boolean('archived').notNull().default(false),
    /** open → in_review → released | on_hold (→ in_review again). */
    state: text('state').notNull().default('open'),
    createdBy: text('created_by').references(() => user.id, { onDelete: 'set null' }),
    createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
    updatedAt: timestamp('updated_at', { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [index('batch_org_idx').on(t.organizationId, t.createdAt)],
);

/**
 * One measured I-V curve with what the engine found. The figures used for sorting and filtering
 * are also columns; the complete result objects (CLI/API vocabulary) are kept as JSON.
 */
export const curve = pgTable(
  'curve',
  {
    id: text('id').primaryKey(),
    organizationId: text('organization_id')
      .notNull()
      .references(() => organization.id, { onDelete: 'cascade' }),
    batchId: text('batch_id')
      .notNull()
      .references(() => batch.id, { onDelete: 'cascade' }),
    deviceId: text('device_id').notNull(),
    fileName: text('file_name').notNull(),
    meta: jsonb('meta').$type<CurveMeta>().notNull(),
    // json, not jsonb: stored as sent and read back without jsonb's conversion of every number (measured: README, "Past one machine").
    voltage_v: json('voltage_v').$type<number[]>().notNull(),
    current_a: json('current_a').$type<number[]>().notNull(),
    notes: jsonb('notes').$type<string[]>().notNull(),
    metrics: jsonb('metrics').$type<Metrics>().notNull(),
    flags: jsonb('flags').$type<Flag[]>().notNull(),
    stc: jsonb('stc').$type<StcOutcome | null>(),
    isc_a: doublePrecision('isc_a').notNull(),
    voc_v: doublePrecision('voc_v').notNull(),
    pmp_w: doublePrecision('pmp_w').notNull(),
    ff: doublePrecision('ff').notNull(),
    efficiency: doublePrecision('efficiency'),
    n: doublePrecision('n'),
    rs_ohm: doublePrecision('rs_ohm'),
    rsh_ohm: doublePrecision('rsh_ohm'),
    stc_pmp_w: doublePrecision('stc_pmp_w'),
    // The current single-diode fit's remaining figures, so comparisons of 10,000 curves read one table.
    iph_a: doublePrecision('iph_a'),
    i0_a: doublePrecision('i0_a'),
    rmse_a: doublePrecision('rmse_a'),
    fitted: boolean('fitted').notNull().default(false),
    flagCodes: text('flag_codes').notNull().default(''),
    /** The curve as one comparison record, JSON (server/services/curves.ts comparisonRecord): a 10,000-curve comparison reads one field a curve. */
    record: text('record'),
    /** SHA-256 (hex) of the uploaded file's bytes, when the curve came from an upload; a release record keeps it. */
    file_sha256: text('file_sha256'),
    /** Size in bytes of the uploaded file (its original is kept in object storage: original_file, server/services/originals.ts). */
    file_size: integer('file_size'),
    /** Where the curve's fits are: queued | fitting | done | failed (the job queue, PostgreSQL mode); embedded uploads store `done`. */
    status: text('status').notNull().default('done'),
    /** Why the fits failed or were cancelled (status `failed`). */
    statusReason: text('status_reason'),
    createdBy: text('created_by').references(() => user.id, { onDelete: 'set null' }),
    createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [index('curve_batch_idx').on(t.batchId, t.deviceId), index('curve_org_idx').on(t.organizationId)],
);

/** Every fit ever made of a curve; `current` marks the one per model shown now (history kept). */
export const fit = pgTable(
  'fit',
  {
    id: text('id').primaryKey(),
    curveId: text('curve_id')
      .notNull()
      .references(() => curve.id, { onDelete: 'cascade' }),
    model: text('model').notNull(),
    current: boolean('current').notNull().default(true),
    result: jsonb('result').$type<FitResult>().notNull(),
    /** The conditions the fit used (temperature, cells, irradiance, idealities). */
    conditions: jsonb('conditions').$type<Record<string, unknown>>().notNull(),
    reason: text('reason').notNull(),
    createdBy: text('created_by').references(() => user.id, { onDelete: 'set null' }),
    createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [index('fit_curve_idx').on(t.curveId, t.current)],
);

/**
 * Acceptance specs, versioned: every save makes a new row; `family_id` ties the versions of one
 * spec together and `version` counts 1, 2, 3… within it. Rows are never changed afterwards.
 */
export const spec = pgTable(
  'spec',
  {
    id: text('id').primaryKey(),
    organizationId: text('organization_id')
      .notNull()
      .references(() => organization.id, { onDelete: 'cascade' }),
    family_id: text('family_id').notNull(),
    version: integer('version').notNull(),
    name: text('name').notNull(),
    /** The validated spec body (lib/quality specInputSchema output). */
    body: jsonb('body').$type<Record<string, unknown>>().notNull(),
    /** What changed against the previous version, in words. */
    changes: jsonb('changes').$type<string[]>().notNull(),
    createdBy: text('created_by').references(() => user.id, { onDelete: 'set null' }),
    createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [uniqueIndex('spec_family_version_idx').on(t.family_id, t.version), index('spec_org_idx').on(t.organizationId)],
);

/** The review record of a batch: submissions, releases, holds — who, when, which spec, the counts. */
export const batchReview = pgTable(
  'batch_review',
  {
    id: text('id').primaryKey(),
    batchId: text('batch_id')
      .notNull()
      .references(() => batch.id, { onDelete: 'cascade' }),
    action: text('action').notNull(),
    specId: text('spec_id').references(() => spec.id, { onDelete: 'set null' }),
    counts: jsonb('counts').$type<Record<string, number> | null>(),
    comment: text('comment'),
    actorId: text('actor_id').references(() => user.id, { onDelete: 'set null' }),
    createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [index('batch_review_batch_idx').on(t.batchId, t.createdAt)],
);

/**
 * What a release froze: the spec version, the counts, every device's figures, result and a
 * SHA-256 of its data, and the pass/fail CSV exactly as served (`csv`, UTF-8 text). Rows are
 * never changed: a reopened batch keeps its old releases readable and downloadable.
 */
export const batchRelease = pgTable(
  'batch_release',
  {
    id: text('id').primaryKey(),
    organizationId: text('organization_id')
      .notNull()
      .references(() => organization.id, { onDelete: 'cascade' }),
    batchId: text('batch_id')
      .notNull()
      .references(() => batch.id, { onDelete: 'cascade' }),
    /** 1 for the first release, one more after each reopening. */
    revision: integer('revision').notNull(),
    /** The batch_review row of the decision. */
    reviewId: text('review_id').notNull(),
    specId: text('spec_id'),
    specName: text('spec_name').notNull(),
    specVersion: integer('spec_version').notNull(),
    counts: jsonb('counts').$type<Record<string, number>>().notNull(),
    /** One entry a device: device_id, curve_id, result, reasons, power_class, figures, points_sha256, file_sha256. */
    devices: jsonb('devices').$type<Record<string, unknown>[]>().notNull(),
    csvFileName: text('csv_file_name').notNull(),
    csv: text('csv').notNull(),
    csvSha256: text('csv_sha256').notNull(),
    comment: text('comment'),
    releasedBy: text('released_by').references(() => user.id, { onDelete: 'set null' }),
    createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [index('batch_release_batch_idx').on(t.batchId, t.revision)],
);

/** An organisation's settings; no row means every default. */
export const organizationSetting = pgTable('organization_setting', {
  organizationId: text('organization_id')
    .primaryKey()
    .references(() => organization.id, { onDelete: 'cascade' }),
  /** Separation of duties: whoever submitted a batch or uploaded any of its curves may not release it. */
  separateRelease: boolean('separate_release').notNull().default(true),
  /** How many years the original files of a released batch are kept before an administrator may delete them. */
  retentionYears: integer('retention_years').notNull().default(10),
});

/**
 * Every file an upload received and kept byte for byte in object storage (accepted or rejected),
 * under `org/<organisation>/batch/<batch>/<sha256>` (server/storage). The row is written after the
 * object and before any curve row, so no row points to a missing object; objects without a row
 * (a crash between the two writes) are removed at start. `result` is null while the upload runs.
 */
export const originalFile = pgTable(
  'original_file',
  {
    id: text('id').primaryKey(),
    organizationId: text('organization_id')
      .notNull()
      .references(() => organization.id, { onDelete: 'cascade' }),
    batchId: text('batch_id')
      .notNull()
      .references(() => batch.id, { onDelete: 'cascade' }),
    fileName: text('file_name').notNull(),
    sha256: text('sha256').notNull(),
    size: integer('size').notNull(),
    contentType: text('content_type').notNull(),
    /** accepted | rejected; null while the upload runs (or when it stopped). */
    result: text('result'),
    /** The rejection's code (wrong_type, duplicate, …). */
    code: text('code'),
    /** The curve made from it (no foreign key: a replaced curve goes, its original stays). */
    curveId: text('curve_id'),
    deviceId: text('device_id'),
    uploadedBy: text('uploaded_by').references(() => user.id, { onDelete: 'set null' }),
    /** When the upload began (the same for every file of one upload). */
    createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
    /** The file's place in its upload (0, 1, …): with created_at, the order the files were sent in. */
    position: integer('position').notNull().default(0),
    /** Set when an administrator deleted the batch's originals (retention); the object is gone. */
    deletedAt: timestamp('deleted_at', { withTimezone: true }),
    deletedBy: text('deleted_by').references(() => user.id, { onDelete: 'set null' }),
  },
  (t) => [index('original_file_batch_idx').on(t.batchId, t.createdAt, t.position), index('original_file_key_idx').on(t.organizationId, t.batchId, t.sha256)],
);
