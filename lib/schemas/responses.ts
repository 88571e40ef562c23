/**
 * The API's answers, as zod schemas: the client's response types are `z.infer` of these
 * (lib/api/*), the server's serializers are typed against the same types, and
 * tests/server/response-schemas.test.ts parses the real answers with them (objects are strict:
 * a key the schema does not name fails), so server and client cannot drift apart. Every key is
 * the vocabulary's (lib/vocabulary.ts): snake_case with its unit. Large engine payloads (fit
 * results, key figures, physics reports) are checked by their engine types (`engine<T>()`) and
 * by the snake_case walk of tests/server/access-matrix.test.ts, not re-declared here.
 */
import { z } from 'zod';
import { ROLES } from '@/lib/auth/roles';
import type { Permission } from '@/lib/auth/roles';
import type { BatchColumns } from '@/lib/quality/compare-table';
import type { CurveMeta, FitResult, Flag, Metrics } from '@/lib/iv/types';
import type { StcOutcome } from '@/lib/schemas/curves';
import { SEVERITIES } from '@/lib/quality/severity';
import type { Spec } from '@/lib/quality/spec';
import { setupRefSchema } from '@/lib/schemas/setup-answer';

export * from '@/lib/schemas/setup-answer';

/** An object the engine's own type describes; only "is an object" is checked at run time. */
const engine = <T>() => z.custom<T>((v) => v !== null && typeof v === 'object');
/** A date as JSON carries it (ISO text); the server's Date objects serialize to it. */
const stamp = z.union([z.string(), z.date()]).transform((v) => (typeof v === 'string' ? v : v.toISOString()));
const num = z.number().nullable();

// ---------------------------------------------------------------- batches
export const describeStatsSchema = z.strictObject({
  n: z.number(),
  mean: z.number(),
  sd: num,
  min: z.number(),
  p5: z.number(),
  median: z.number(),
  p95: z.number(),
  max: z.number(),
  cpk: num,
  cpk_side: z.enum(['both', 'upper', 'lower']).nullable().optional(),
});

export const batchSchema = z.strictObject({
  id: z.string(),
  name: z.string(),
  product_type: z.string().nullable(),
  supplier: z.string().nullable(),
  line: z.string().nullable(),
  lot: z.string().nullable(),
  batch_date: z.string().nullable(),
  cells: num,
  area_cm2: num,
  nameplate_w: num,
  irradiance_w_m2: num,
  alpha_pct_per_k: num,
  beta_pct_per_k: num,
  gamma_pct_per_k: num,
  rs_ohm: num,
  kappa_ohm_per_k: num,
  /** The measurement setup named by the batch; null: the organisation's default setup. */
  setup_id: z.string().nullable(),
  description: z.string().nullable(),
  archived: z.boolean(),
  state: z.enum(['open', 'in_review', 'released', 'on_hold']),
  created_at: stamp,
  updated_at: stamp,
  curve_count: z.number().optional(),
  mean_pmp_w: num.optional(),
  summary: z.record(z.string(), describeStatsSchema.nullable()).optional(),
  flag_counts: z.record(z.string(), z.number()).optional(),
});
export const batchListSchema = z.strictObject({ batches: z.array(batchSchema) });

// ---------------------------------------------------------------- curves
const fitJsonSchema = engine<FitResult & { fit_id: string; conditions: Record<string, unknown>; reason: string; created_at: string }>();

export const curveRowSchema = z.strictObject({
  id: z.string(),
  batch_id: z.string(),
  device_id: z.string(),
  file_name: z.string(),
  meta: engine<CurveMeta>(),
  metrics: engine<Metrics>(),
  flags: z.array(engine<Flag>()),
  stc: engine<StcOutcome>().nullable(),
  fits: z.array(fitJsonSchema),
  /** Where the fits are: queued | fitting | done | failed (PostgreSQL mode queues them; embedded uploads answer done). */
  status: z.enum(['queued', 'fitting', 'done', 'failed']),
  /** Why the fits failed or were cancelled, else null. */
  status_reason: z.string().nullable(),
  created_at: stamp,
});
/** pass | warn | fail: a device's worst severity (lib/quality/severity.ts). */
const severitySchema = z.enum(SEVERITIES);
/** The spec a batch's pages judge it against: that of its last review decision, or null. */
const batchSpecSchema = z.strictObject({ id: z.string(), name: z.string(), version: z.number() }).nullable();
/** A row of the batch table: the curve with its worst severity and, when the batch's spec fails it, the spec's reasons. */
export const curvePageRowSchema = curveRowSchema.extend({ severity: severitySchema, reasons: z.array(z.string()) });
/** GET /api/batches/:id/fits and POST …/fits/cancel: the batch's curves by fit status (and how many were cancelled). */
const fitCountsSchema = z.strictObject({ queued: z.number(), fitting: z.number(), done: z.number(), failed: z.number() });
export const fitStatusSchema = z.strictObject({ batch_id: z.string(), counts: fitCountsSchema, cancelled: z.number().optional() });
export const curvePageSchema = z.strictObject({ curves: z.array(curvePageRowSchema), total: z.number(), page: z.number(), page_size: z.number(), spec: batchSpecSchema });

export const fitHistorySchema = z.strictObject({
  fit_id: z.string(),
  model: z.string(),
  current: z.boolean(),
  reason: z.string(),
  conditions: z.record(z.string(), z.unknown()),
  rmse_a: num,
  converged: z.boolean(),
  created_at: stamp,
});
const curveBodySchema = curveRowSchema.extend({
  points: z.strictObject({ voltage_v: z.array(z.number()), current_a: z.array(z.number()) }),
  notes: z.array(z.string()),
  history: z.array(fitHistorySchema),
});
/** GET /api/curves/:id; a refit answers the same without `batch`. */
/** What a curve's page says about the file it was read from (null: stored without one, such as the demo data). */
export const curveOriginalSchema = z
  .strictObject({
    file_name: z.string(),
    file_sha256: z.string(),
    file_size_bytes: z.number().nullable(),
    content_type: z.string().nullable(),
    kept: z.boolean(),
    deleted_at: z.string().nullable(),
    url: z.string(),
  })
  .nullable();
export const curveDetailSchema = curveBodySchema.extend({
  batch: z.strictObject({ id: z.string(), name: z.string(), state: z.string() }),
  original: curveOriginalSchema,
  /** Expanded uncertainties (k = 2) of the figures by key (u_pmp_w, u_isc_a, u_voc_v, u_stc_pmp_w); empty without a setup. */
  uncertainty: z.record(z.string(), z.number()),
  /** The batch's measurement setup and its budget under the batch's coefficients, or null. */
  setup: z.lazy(() => setupRefSchema).nullable(),
});
/** POST /api/batches/:id/originals/verify: every kept original read back and hashed; what differs from the upload's record. */
export const originalsCheckSchema = z.strictObject({
  batch_id: z.string(),
  checked: z.number(),
  ok: z.boolean(),
  problems: z.array(
    z.strictObject({
      file_name: z.string(),
      device_id: z.string().nullable(),
      problem: z.enum(['mismatch', 'missing', 'curve_mismatch']),
      expected_sha256: z.string(),
      found_sha256: z.string().nullable(),
    }),
  ),
  checked_at: stamp,
});
/** DELETE /api/batches/:id/originals. */
export const originalsDeletedSchema = z.strictObject({ batch_id: z.string(), deleted: z.number(), deleted_at: stamp });
export type OriginalsCheck = z.infer<typeof originalsCheckSchema>;
export const refitAnswerSchema = curveBodySchema.extend({ batch: z.strictObject({ id: z.string(), name: z.string(), state: z.string() }).optional() });

export const overlaySchema = z.strictObject({
  total: z.number(),
  sampled: z.number(),
  /** The spec the severities were judged against (null: the flags' severities alone). */
  spec: batchSpecSchema,
  curves: z.array(z.strictObject({ id: z.string(), device_id: z.string(), severity: severitySchema, voltage_v: z.array(z.number()), current_a: z.array(z.number()) })),
});

export const uploadResultSchema = z.union([
  z.strictObject({ file: z.string(), accepted: z.literal(true), curve_id: z.string(), device_id: z.string(), replaced: z.number().optional(), file_sha256: z.string().optional() }),
  z.strictObject({ file: z.string(), accepted: z.literal(false), error: z.string(), code: z.string(), device_id: z.string().optional(), line: z.number().optional(), file_sha256: z.string().optional() }),
]);
export const uploadAnswerSchema = z.strictObject({ results: z.array(uploadResultSchema), accepted: z.number(), rejected: z.number() });

// ---------------------------------------------------------------- specs, evaluations, reviews, comparisons
const specVersionSchema = z.strictObject({ id: z.string(), version: z.number(), changes: z.array(z.string()), created_at: stamp, by: z.string().nullable() });
export const specJsonSchema = z.strictObject({
  id: z.string(),
  family_id: z.string(),
  version: z.number(),
  name: z.string(),
  changes: z.array(z.string()),
  created_by: z.string().nullable(),
  created_at: stamp,
  limits: engine<Spec['limits']>(),
  power_classes: engine<NonNullable<Spec['power_classes']>>().optional(),
  fail_flags: z.array(z.string()).optional(),
  notes: z.string().optional(),
  decision_rule: z.enum(['simple', 'guard_band']).optional(),
  nameplate_limits: engine<NonNullable<Spec['nameplate_limits']>>().optional(),
  versions: z.array(specVersionSchema).optional(),
});
export const specListSchema = z.strictObject({ specs: z.array(specJsonSchema) });

const countsSchema = z.strictObject({ total: z.number(), pass: z.number(), fail: z.number(), outliers: z.number() });
export const deviceEvalSchema = z.strictObject({
  device_id: z.string(),
  curve_id: z.string(),
  result: z.enum(['pass', 'fail']),
  reasons: z.array(z.strictObject({ kind: z.string(), param: z.string(), value: z.union([z.number(), z.string()]).nullable(), message: z.string(), limit: z.unknown().optional() }).loose()),
  power_class: z.string().nullable(),
  outlier: z.boolean(),
  outlier_params: z.array(z.string()),
  robust_z: z.record(z.string(), num),
  values: z.record(z.string(), num),
  flags: z.array(z.string()),
  /** A value within its expanded uncertainty of a limit (lib/quality/decision-rules.ts). */
  in_guard_band: z.boolean(),
  /** Expanded uncertainties (k = 2) by key: u_pmp_w, u_isc_a, u_voc_v, u_stc_pmp_w. */
  uncertainty: z.record(z.string(), z.number()),
});
export const evaluationSchema = z.strictObject({
  batch: batchSchema,
  spec: z.strictObject({ id: z.string(), name: z.string(), version: z.number(), family_id: z.string() }),
  counts: countsSchema,
  power_class_counts: z.record(z.string(), z.number()),
  stats: z.record(z.string(), describeStatsSchema.nullable()),
  devices: z.array(deviceEvalSchema),
  /** The spec's decision rule and how many devices lie within their uncertainty of a limit. */
  decision_rule: z.enum(['simple', 'guard_band']),
  inside_guard_band: z.number(),
  /** The setup whose budget the figures carry (null: none) and its expanded relative uncertainties. */
  setup: setupRefSchema.nullable(),
});

export const reviewSchema = z.strictObject({
  id: z.string(),
  action: z.string(),
  spec_id: z.string().nullable(),
  counts: z.record(z.string(), z.number()).nullable(),
  comment: z.string().nullable(),
  created_at: stamp,
  actor: z.string().nullable(),
  actor_email: z.string().nullable(),
  release_id: z.string().nullable(),
});
/** A release as listed: what it froze, and where its pass/fail CSV stays downloadable. */
export const releaseSummarySchema = z.strictObject({
  id: z.string(),
  revision: z.number(),
  spec_id: z.string().nullable(),
  spec_name: z.string(),
  spec_version: z.number(),
  counts: z.record(z.string(), z.number()),
  comment: z.string().nullable(),
  released_by: z.string().nullable(),
  created_at: stamp,
  csv_file_name: z.string(),
  csv_sha256: z.string(),
  csv_url: z.string(),
});
/** Whether the caller may release the batch (separation of duties), with the reason when not. */
export const releaseCheckSchema = z.union([
  z.strictObject({ allowed: z.literal(true) }),
  z.strictObject({ allowed: z.literal(false), code: z.literal('same_person'), message: z.string() }),
]);
export const reviewListSchema = z.strictObject({ reviews: z.array(reviewSchema), releases: z.array(releaseSummarySchema), release_check: releaseCheckSchema });

export const differenceSchema = z
  .strictObject({
    batch_a: z.string(),
    batch_b: z.string(),
    param: z.string(),
    difference: z.number().optional(),
    ci_low: z.number().optional(),
    ci_high: z.number().optional(),
    p: z.number().optional(),
    dof: z.number().optional(),
    sentence: z.string().optional(),
    significant: z.boolean().optional(),
    error: z.string().optional(),
    /** How the pair was compared: as measured, per cell (different kinds of devices), or refused. */
    basis: z.enum(['as_measured', 'per_cell', 'refused']).optional(),
  })
  // The Welch test's other figures (n_a, mean_a, sd_a, t, …) travel along.
  .catchall(z.union([z.number(), z.string(), z.boolean()]));
export const comparisonWireSchema = z.strictObject({
  batches: z.array(z.strictObject({ id: z.string(), name: z.string(), state: z.string(), count: z.number() })),
  spec: z.strictObject({ id: z.string(), name: z.string(), version: z.number(), decision_rule: z.enum(['simple', 'guard_band']).optional() }).nullable(),
  param: z.string(),
  stats: z.record(z.string(), z.record(z.string(), describeStatsSchema.nullable())),
  counts: z.record(z.string(), countsSchema.nullable()),
  differences: z.array(differenceSchema),
  tables: z.array(engine<BatchColumns>()),
  outliers: z.array(z.array(z.boolean().nullable())),
  /** The kinds of devices in the batches and how the chosen parameter is compared across them (lib/quality/compare-kinds.ts). */
  kinds: z.strictObject({
    batches: z.array(z.strictObject({ batch_id: z.string(), cells: z.array(z.number()), without_cells: z.number(), label: z.string() })),
    mixed: z.boolean(),
    basis: z.enum(['as_measured', 'per_cell', 'refused']),
    note: z.string().nullable(),
    per_cell_stats: z.record(z.string(), describeStatsSchema.nullable()).nullable(),
  }),
});

// ---------------------------------------------------------------- people
/** Where a signed-in person stands (GET /api/me `account_state`). */
export const accountStateSchema = z.enum(['active', 'email_unverified', 'awaiting_approval', 'refused', 'no_organisation', 'deactivated']);
/** GET /api/me: any signed-in person, verified or not, member or not. */
export const meSchema = z.strictObject({
  user: z.strictObject({ id: z.string(), name: z.string(), email: z.string(), role: z.enum(ROLES).nullable() }),
  organization: z.strictObject({ id: z.string(), name: z.string(), domain: z.string() }).nullable(),
  role: z.enum(ROLES).nullable(),
  permissions: z.array(z.custom<Permission>((v) => typeof v === 'string' && /^[a-z]+:[a-z]+$/.test(v))),
  email_verified: z.boolean(),
  account_state: accountStateSchema,
  join_request: z.strictObject({ status: z.string(), organization_name: z.string(), created_at: stamp }).nullable(),
});
export const orgUserSchema = z.strictObject({
  id: z.string(),
  name: z.string(),
  email: z.string(),
  role: z.enum(ROLES),
  member_id: z.string(),
  joined_at: stamp,
  active: z.boolean(),
  deactivated_at: z.string().nullable(),
});
export const userListSchema = z.strictObject({ users: z.array(orgUserSchema) });
export const outboxMessageSchema = z.strictObject({
  id: z.string(),
  to: z.string(),
  subject: z.string(),
  body: z.string(),
  kind: z.string(),
  transport: z.string(),
  file: z.string().nullable(),
  created_at: stamp,
});
export const outboxSchema = z.strictObject({ messages: z.array(outboxMessageSchema) });

/** What a serializer may hand to res.json (dates still Date objects). */
export type BatchOut = z.input<typeof batchSchema>;
export type SpecOut = z.input<typeof specJsonSchema>;
export type ReviewListOut = z.input<typeof reviewListSchema>;
export type UserListOut = z.input<typeof userListSchema>;
export type OutboxOut = z.input<typeof outboxSchema>;
export type UploadAnswerOut = z.input<typeof uploadAnswerSchema>;

export type DescribeStats = z.infer<typeof describeStatsSchema>;
export type Batch = z.infer<typeof batchSchema>;
export type BatchList = z.infer<typeof batchListSchema>;
export type CurveRow = z.infer<typeof curveRowSchema>;
export type CurvePage = z.infer<typeof curvePageSchema>;
export type FitStatus = z.infer<typeof fitStatusSchema>;
export type CurvePageRow = z.infer<typeof curvePageRowSchema>;
export type CurveDetail = z.infer<typeof curveDetailSchema>;
export type RefitAnswer = z.infer<typeof refitAnswerSchema>;
export type Overlay = z.infer<typeof overlaySchema>;
export type OverlayCurve = Overlay['curves'][number];
export type UploadFileResult = z.infer<typeof uploadResultSchema>;
export type UploadAnswer = z.infer<typeof uploadAnswerSchema>;
export type SpecJson = z.infer<typeof specJsonSchema>;
export type SpecList = z.infer<typeof specListSchema>;
export type DeviceEval = z.infer<typeof deviceEvalSchema>;
export type Evaluation = z.infer<typeof evaluationSchema>;
export type Review = z.infer<typeof reviewSchema>;
export type ReviewList = z.infer<typeof reviewListSchema>;
export type Difference = z.infer<typeof differenceSchema>;
export type ComparisonWire = z.infer<typeof comparisonWireSchema>;
export type Account = z.infer<typeof meSchema>;
export type AccountState = z.infer<typeof accountStateSchema>;
/** An active, verified member: what the signed-in screens work with. */
export type Me = Account & {
  user: Account['user'] & { role: NonNullable<Account['role']> };
  organization: NonNullable<Account['organization']>;
  role: NonNullable<Account['role']>;
  account_state: 'active';
};
export type ReleaseSummary = z.infer<typeof releaseSummarySchema>;
export type ReleaseCheck = z.infer<typeof releaseCheckSchema>;
export type ReviewRecord = ReviewList;
export type OrgUser = z.infer<typeof orgUserSchema>;
export type UserList = z.infer<typeof userListSchema>;
export type OutboxMessage = z.infer<typeof outboxMessageSchema>;
export type Outbox = z.infer<typeof outboxSchema>;


