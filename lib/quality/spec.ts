/**
 * Acceptance specification: limits per parameter, power classes and failing flags. One zod
 * schema serves the spec form and the API route; its messages name the field and the fault.
 */
import { z } from 'zod';
import { QualityError } from '@/lib/quality/errors';
import { PARAM_KEYS, type ParamKey } from '@/lib/quality/params';
import { textProblem } from '@/lib/schemas/text';
import { formatAgainst, labelWithUnit } from '@/lib/vocabulary';

const finite = (what: string) => z.number({ error: `${what} must be a finite number` });

/** Refuses control characters (NUL above all) in stored text; lengths are checked by each field's max. */
const noControl = (what: string, multiline = false) =>
  [(v: string) => !textProblem(v, { max: Number.POSITIVE_INFINITY, multiline }), `${what} contains a control character`] as const;

const unknownKeys = (what: string, known: readonly string[]) => ({
  error: (iss: { code?: string; keys?: string[] }) =>
    iss.code === 'unrecognized_keys'
      ? `unknown ${what} ${iss.keys!.map((k) => `"${k}"`).join(', ')}; known: ${known.join(', ')}`
      : undefined,
});

/**
 * min and/or max of one parameter, both inclusive (a value equal to a bound passes). Messages
 * show the bounds as the screens do (FF in %), from the key table.
 */
export function limitSchemaOf(key: ParamKey) {
  const bound = z.number({ error: 'must be a number' });
  return z
    .strictObject({ min: bound.optional(), max: bound.optional() }, unknownKeys('limit field', ['min', 'max']))
    .superRefine((l, ctx) => {
      if (l.min === undefined && l.max === undefined) {
        ctx.addIssue({ code: 'custom', message: 'give a minimum, a maximum or both', path: [] });
      } else if (l.min !== undefined && l.max !== undefined && l.min > l.max) {
        const shown = formatAgainst(key, l.min, [l.max]);
        ctx.addIssue({ code: 'custom', message: `the minimum ${shown.value} is above the maximum ${shown.limits[0]}`, path: [] });
      }
    });
}

/** The limit schema of any one parameter (its type; messages of the parameter's own are limitSchemaOf's). */
export const limitSchema = limitSchemaOf('pmp_w');

const limitsShape = Object.fromEntries(PARAM_KEYS.map((k) => [k, limitSchemaOf(k).optional()])) as Record<
  ParamKey,
  z.ZodOptional<typeof limitSchema>
>;

/** Limits keyed by the engine's result keys; any other key is rejected. */
export const limitsSchema = z.strictObject(limitsShape, unknownKeys('parameter', PARAM_KEYS));

const binSchema = z.strictObject(
  {
    label: z.string().trim().min(1, 'a power class needs a label').max(40).refine(...noControl('label')),
    nominal_w: finite('nominal_w').positive('nominal_w must be above 0 W'),
    min_w: finite('min_w'),
    max_w: finite('max_w'),
  },
  unknownKeys('bin field', ['label', 'nominal_w', 'min_w', 'max_w']),
);

const POWER_FIELDS = ['basis', 'step_w', 'tolerance', 'lowest_w', 'highest_w', 'label_prefix', 'bins', 'nameplate_bins'] as const;

const NAMEPLATE_BIN_FIELDS = ['label', 'from_w', 'to_w', 'from_pct', 'to_pct'] as const;

/** A power class around the nameplate: from ≤ Pmax − nameplate < to, in W or in % of the nameplate (lib/quality/decision-rules.ts). */
const nameplateBinSchema = z
  .strictObject(
    {
      label: z.string().trim().min(1, 'a power class needs a label').max(40).refine(...noControl('label')),
      from_w: finite('from_w').optional(),
      to_w: finite('to_w').optional(),
      from_pct: finite('from_pct').min(-100, 'from_pct must be ≥ −100 %').optional(),
      to_pct: finite('to_pct').min(-100, 'to_pct must be ≥ −100 %').optional(),
    },
    unknownKeys('nameplate bin field', NAMEPLATE_BIN_FIELDS),
  )
  .superRefine((b, ctx) => {
    const from = b.from_w ?? b.from_pct;
    const to = b.to_w ?? b.to_pct;
    if ((b.from_w !== undefined) === (b.from_pct !== undefined)) ctx.addIssue({ code: 'custom', path: ['from_w'], message: `bin "${b.label}": give from_w or from_pct (one of them)` });
    if ((b.to_w !== undefined) === (b.to_pct !== undefined)) ctx.addIssue({ code: 'custom', path: ['to_w'], message: `bin "${b.label}": give to_w or to_pct (one of them)` });
    if ((b.from_w !== undefined) !== (b.to_w !== undefined) && from !== undefined && to !== undefined) {
      ctx.addIssue({ code: 'custom', path: ['to_w'], message: `bin "${b.label}": give both ends in W or both in %` });
    } else if (from !== undefined && to !== undefined && from >= to) {
      ctx.addIssue({ code: 'custom', path: ['to_w'], message: `bin "${b.label}": its lower end (${from}) must be below its upper end (${to})` });
    }
  });

const NAMEPLATE_LIMIT_FIELDS = ['below_w', 'above_w', 'below_pct', 'above_pct'] as const;

/** A limit relative to the nameplate: at least nameplate − below, at most nameplate + above, each in W or %. */
export const nameplateLimitSchema = z
  .strictObject(
    {
      below_w: finite('below_w').optional(),
      above_w: finite('above_w').optional(),
      below_pct: finite('below_pct').max(100, 'below_pct must be at most 100 %').optional(),
      above_pct: finite('above_pct').optional(),
    },
    unknownKeys('nameplate limit field', NAMEPLATE_LIMIT_FIELDS),
  )
  .superRefine((l, ctx) => {
    if (l.below_w !== undefined && l.below_pct !== undefined) ctx.addIssue({ code: 'custom', path: ['below_w'], message: 'give below_w or below_pct, not both' });
    if (l.above_w !== undefined && l.above_pct !== undefined) ctx.addIssue({ code: 'custom', path: ['above_w'], message: 'give above_w or above_pct, not both' });
    if (NAMEPLATE_LIMIT_FIELDS.every((k) => l[k] === undefined)) ctx.addIssue({ code: 'custom', path: [], message: 'give below_w, below_pct, above_w or above_pct' });
  });

/**
 * Power classes, one of two forms:
 *  - steps: nameplates at multiples of `step_w`; a module is in class P when
 *    P − tolerance.minus_w ≤ Pmax < P + tolerance.plus_w. The default tolerance is
 *    positive-only (0 / +step_w, common practice), i.e. P ≤ Pmax < P + step.
 *  - bins: explicit classes [{ label, nominal_w, min_w, max_w }], min_w ≤ Pmax < max_w.
 * `basis` picks the power that is classed: measured `pmp_w` (default) or `stc_pmp_w`.
 */
export const powerClassesSchema = z
  .strictObject(
    {
      basis: z.enum(['pmp_w', 'stc_pmp_w'], { error: 'basis must be "pmp_w" or "stc_pmp_w"' }).optional(),
      step_w: z.number({ error: 'must be a number' }).positive('must be above 0 W').optional(),
      tolerance: z
        .strictObject(
          {
            minus_w: finite('tolerance.minus_w').min(0, 'tolerance.minus_w must be ≥ 0 W'),
            plus_w: finite('tolerance.plus_w').positive('tolerance.plus_w must be above 0 W'),
          },
          unknownKeys('tolerance field', ['minus_w', 'plus_w']),
        )
        .optional(),
      lowest_w: z.number({ error: 'must be a number' }).positive('must be above 0 W').optional(),
      highest_w: z.number({ error: 'must be a number' }).positive('must be above 0 W').optional(),
      label_prefix: z.string().max(8, 'label_prefix is at most 8 characters').refine(...noControl('label_prefix')).optional(),
      bins: z.array(binSchema).min(1, 'bins needs at least one class').optional(),
      nameplate_bins: z.array(nameplateBinSchema).min(1, 'nameplate_bins needs at least one class').optional(),
    },
    unknownKeys('power-class field', POWER_FIELDS),
  )
  .superRefine((pc, ctx) => {
    const stepFields = (['step_w', 'tolerance', 'lowest_w', 'highest_w', 'label_prefix'] as const).filter(
      (k) => pc[k] !== undefined,
    );
    if (pc.nameplate_bins) {
      const other = [...stepFields, ...(pc.bins ? ['bins'] : [])];
      if (other.length) {
        ctx.addIssue({ code: 'custom', path: [other[0]], message: `give either nameplate_bins or other power classes, not both (${other.join(', ')} with nameplate_bins)` });
      }
      const labels = new Set<string>();
      pc.nameplate_bins.forEach((b, i) => {
        if (labels.has(b.label)) ctx.addIssue({ code: 'custom', path: ['nameplate_bins', i, 'label'], message: `bin label "${b.label}" is used twice` });
        labels.add(b.label);
      });
      // Bins written in the same unit must not overlap (from ≤ offset < to: one may start where another ends).
      for (const unit of ['w', 'pct'] as const) {
        const ends = pc.nameplate_bins
          .map((b) => ({ label: b.label, from: unit === 'w' ? b.from_w : b.from_pct, to: unit === 'w' ? b.to_w : b.to_pct }))
          .filter((b): b is { label: string; from: number; to: number } => b.from !== undefined && b.to !== undefined && b.from < b.to)
          .sort((x, y) => x.from - y.from);
        for (let i = 1; i < ends.length; i++) {
          if (ends[i].from < ends[i - 1].to) {
            ctx.addIssue({ code: 'custom', path: ['nameplate_bins'], message: `bins "${ends[i - 1].label}" and "${ends[i].label}" overlap (${ends[i - 1].to} ${unit === 'w' ? 'W' : '%'} > ${ends[i].from} ${unit === 'w' ? 'W' : '%'})` });
          }
        }
      }
      return;
    }
    if (pc.bins) {
      if (stepFields.length) {
        ctx.addIssue({
          code: 'custom',
          path: [stepFields[0]],
          message: `give either bins or step_w-based classes, not both (${stepFields.join(', ')} with bins)`,
        });
      }
      const labels = new Set<string>();
      pc.bins.forEach((b, i) => {
        if (b.min_w >= b.max_w) {
          ctx.addIssue({ code: 'custom', path: ['bins', i], message: `bin "${b.label}": min_w (${b.min_w}) must be below max_w (${b.max_w})` });
        }
        if (labels.has(b.label)) {
          ctx.addIssue({ code: 'custom', path: ['bins', i, 'label'], message: `bin label "${b.label}" is used twice` });
        }
        labels.add(b.label);
      });
      const sorted = [...pc.bins].sort((x, y) => x.min_w - y.min_w);
      for (let i = 1; i < sorted.length; i++) {
        if (sorted[i].min_w < sorted[i - 1].max_w) {
          ctx.addIssue({
            code: 'custom',
            path: ['bins'],
            message: `bins "${sorted[i - 1].label}" and "${sorted[i].label}" overlap (${sorted[i - 1].max_w} W > ${sorted[i].min_w} W)`,
          });
        }
      }
      return;
    }
    if (pc.step_w === undefined) {
      ctx.addIssue({ code: 'custom', path: ['step_w'], message: 'give step_w (nameplate steps in W) or explicit bins' });
      return;
    }
    if (pc.tolerance) {
      const width = pc.tolerance.minus_w + pc.tolerance.plus_w;
      if (Math.abs(width - pc.step_w) > 1e-9 * pc.step_w) {
        ctx.addIssue({
          code: 'custom',
          path: ['tolerance'],
          message: `tolerance.minus_w + tolerance.plus_w (${width} W) must equal step_w (${pc.step_w} W) so that classes neither overlap nor leave gaps`,
        });
      }
    }
    for (const k of ['lowest_w', 'highest_w'] as const) {
      const v = pc[k];
      if (v !== undefined && Math.abs(v / pc.step_w - Math.round(v / pc.step_w)) > 1e-9) {
        ctx.addIssue({ code: 'custom', path: [k], message: `${k} (${v} W) must be a multiple of step_w (${pc.step_w} W)` });
      }
    }
    if (pc.lowest_w !== undefined && pc.highest_w !== undefined && pc.lowest_w > pc.highest_w) {
      ctx.addIssue({ code: 'custom', path: ['lowest_w'], message: `lowest_w (${pc.lowest_w} W) is above highest_w (${pc.highest_w} W)` });
    }
  });

const SPEC_FIELDS = ['name', 'limits', 'power_classes', 'fail_flags', 'notes', 'decision_rule', 'nameplate_limits'] as const;

/** Input of an acceptance specification (form and API body alike). */
export const specInputSchema = z.strictObject(
  {
    name: z.string({ error: 'Give the spec a name.' }).trim().min(1, 'Give the spec a name.').max(120, 'must be at most 120 characters').refine(...noControl('name')),
    limits: limitsSchema.default({}),
    power_classes: powerClassesSchema.optional(),
    fail_flags: z
      .array(z.string().trim().min(1, 'a flag code cannot be empty').max(64).refine(...noControl('a flag code')))
      .max(100)
      .optional(),
    notes: z.string().max(4000, 'notes are at most 4000 characters').refine(...noControl('notes', true)).optional(),
    /** ILAC-G8 decision rule (lib/quality/decision-rules.ts); "simple" when absent. */
    decision_rule: z.enum(['simple', 'guard_band'], { error: 'decision_rule must be "simple" or "guard_band"' }).optional(),
    /** Limits of Pmax and STC Pmax relative to the nameplate (the device's, else the batch's). */
    nameplate_limits: z
      .strictObject({ pmp_w: nameplateLimitSchema.optional(), stc_pmp_w: nameplateLimitSchema.optional() }, unknownKeys('nameplate limit parameter', ['pmp_w', 'stc_pmp_w']))
      .optional(),
  },
  unknownKeys('spec field', SPEC_FIELDS),
);

export type SpecInput = z.input<typeof specInputSchema>;
export type Spec = z.output<typeof specInputSchema>;
export type PowerClasses = z.output<typeof powerClassesSchema>;
export type LimitSpec = z.output<typeof limitSchema>;

/** Labels of the spec's fields outside the limits, as the spec editor names them. */
const SPEC_FIELD_LABELS: Record<string, string> = {
  name: 'Name',
  notes: 'Notes',
  fail_flags: 'Flags that fail a device',
  power_classes: 'Power classes',
  step_w: 'Power class step (W)',
  basis: 'Power class basis',
  tolerance: 'Power class tolerance',
  lowest_w: 'Lowest power class (W)',
  highest_w: 'Highest power class (W)',
  label_prefix: 'Power class prefix',
  bins: 'Power class bins',
  nameplate_bins: 'Power classes around the nameplate',
  family_id: 'Spec',
  base_version: 'Version edited from',
};

/**
 * Where an issue is, in the spec editor's words: ["limits", "stc_pmp_w", "min"] → "Pmax at STC
 * (W) minimum", ["power_classes", "step_w"] → "Power class step (W)"; '' for the spec as a whole.
 */
export function specFieldLabel(path: readonly PropertyKey[]): string {
  const p = path.map(String);
  if (p[0] === 'limits' && p[1]) {
    const side = p[2] === 'min' ? ' minimum' : p[2] === 'max' ? ' maximum' : '';
    return `${(PARAM_KEYS as readonly string[]).includes(p[1]) ? labelWithUnit(p[1]) : p[1]}${side}`;
  }
  if (p[0] === 'limits') return 'Limits';
  if (p[0] === 'fail_flags' && p[1] !== undefined) return `Failing flag ${Number(p[1]) + 1}`;
  if (p[0] === 'power_classes' && (p[1] === 'bins' || p[1] === 'nameplate_bins') && p[2] !== undefined) return `Power class bin ${Number(p[2]) + 1}`;
  const last = p[p.length - 1];
  return last === undefined ? '' : (SPEC_FIELD_LABELS[last] ?? last);
}

/**
 * "Rs (Ω): the minimum 2 Ω is above the maximum 1 Ω", "Pmax at STC (W) minimum must be a number"
 * — one line per zod issue, each naming its field as the spec editor labels it.
 */
export function specIssueMessages(error: z.ZodError): string[] {
  return error.issues.map((iss) => {
    const label = specFieldLabel(iss.path);
    // A whole sentence ("Give the spec a name.") names its field itself.
    if (!label || /^[A-Z]/.test(iss.message)) return iss.message;
    return /^must /.test(iss.message) ? `${label} ${iss.message}` : `${label}: ${iss.message}`;
  });
}

/** Validates a spec; throws QualityError listing every problem. */
export function parseSpec(input: unknown): Spec {
  const r = specInputSchema.safeParse(input);
  if (!r.success) throw new QualityError(`invalid spec: ${specIssueMessages(r.error).join('; ')}`);
  return r.data;
}
