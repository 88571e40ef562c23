/**
 * Measurement setups with their uncertainty budgets (lib/quality/uncertainty.ts): list, read,
 * create, edit, the default of an organisation, and the budget a batch's figures carry. A batch
 * names its setup (`batch.setup_id`); without one it takes the organisation's default setup;
 * without either its figures carry no uncertainty. An edit of a setup moves the revision of
 * every batch it applies to, so cached answers and a judgement under way see the change.
 */
import { and, asc, eq, inArray, isNull, or } from 'drizzle-orm';
import type { Db } from '@/db/client';
import { batch, measurementSetup } from '@/db/schema';
import { combineBudget, deviceUncertainty, type Budget, type UncertaintyComponent } from '@/lib/quality/uncertainty';
import type { setupInputSchema, setupPatchSchema } from '@/lib/quality/uncertainty';
import type { SetupOut } from '@/lib/schemas/responses';
import { HttpError, notFound } from '@/server/errors';
import { touchBatch } from '@/server/services/answer-cache';
import type { BatchRow } from '@/server/services/batches';
import type { DeviceRow } from '@/server/services/quality';

type SetupRow = typeof measurementSetup.$inferSelect;
type Tx = Parameters<Parameters<Db['transaction']>[0]>[0];

/** The API shape: the setup, its components and the expanded (k = 2) relative uncertainties with typical coefficients. */
export function setupJson(s: SetupRow): SetupOut {
  const components = s.components as UncertaintyComponent[];
  return {
    id: s.id,
    name: s.name,
    is_default: s.is_default,
    components,
    ...combineBudget(components),
    created_at: s.createdAt,
    updated_at: s.updatedAt,
  };
}

async function loadSetup(db: Db | Tx, organizationId: string, id: string): Promise<SetupRow> {
  const [s] = await db.select().from(measurementSetup).where(and(eq(measurementSetup.id, id), eq(measurementSetup.organizationId, organizationId)));
  if (!s) throw notFound('That measurement setup');
  return s;
}

/** Every setup of the organisation, the default first. */
export async function listSetups(db: Db, organizationId: string) {
  const rows = await db.select().from(measurementSetup).where(eq(measurementSetup.organizationId, organizationId)).orderBy(asc(measurementSetup.name));
  rows.sort((a, b) => Number(b.is_default) - Number(a.is_default));
  return { setups: rows.map(setupJson) };
}

export async function setupDetail(db: Db, organizationId: string, id: string) {
  return setupJson(await loadSetup(db, organizationId, id));
}

/** Makes `id` the organisation's only default setup. */
async function makeDefault(tx: Tx, organizationId: string, id: string) {
  await tx.update(measurementSetup).set({ is_default: false }).where(and(eq(measurementSetup.organizationId, organizationId), eq(measurementSetup.is_default, true)));
  await tx.update(measurementSetup).set({ is_default: true }).where(eq(measurementSetup.id, id));
}

/** The batches whose figures a setup's budget gives: those naming it, and when it is the default those naming none. */
async function touchBatchesOf(tx: Tx, organizationId: string, setupIds: string[], includeUnnamed: boolean) {
  const named = setupIds.length ? inArray(batch.setup_id, setupIds) : undefined;
  const where = includeUnnamed ? (named ? or(named, isNull(batch.setup_id)) : isNull(batch.setup_id)) : named;
  if (!where) return;
  const rows = await tx.select({ id: batch.id }).from(batch).where(and(eq(batch.organizationId, organizationId), where));
  for (const r of rows) await touchBatch(tx, r.id);
}

/** A new setup; the organisation's first one (or one asked to be) becomes its default. */
export async function createSetup(db: Db, who: { organizationId: string; userId: string }, input: ReturnType<typeof setupInputSchema.parse>) {
  return db.transaction(async (tx) => {
    const existing = await tx.select({ id: measurementSetup.id }).from(measurementSetup).where(eq(measurementSetup.organizationId, who.organizationId)).limit(1);
    const id = crypto.randomUUID();
    await tx.insert(measurementSetup).values({ id, organizationId: who.organizationId, name: input.name, components: input.components, createdBy: who.userId });
    const isDefault = !existing.length || input.is_default === true;
    if (isDefault) {
      await makeDefault(tx, who.organizationId, id);
      await touchBatchesOf(tx, who.organizationId, [], true);
    }
    return setupJson(await loadSetup(tx, who.organizationId, id));
  });
}

/** Renames a setup, replaces its components or makes it the default; the batches it applies to get a new revision. */
export async function editSetup(db: Db, organizationId: string, id: string, input: ReturnType<typeof setupPatchSchema.parse>) {
  return db.transaction(async (tx) => {
    const before = await loadSetup(tx, organizationId, id);
    const changes: Partial<typeof measurementSetup.$inferInsert> = { updatedAt: new Date() };
    if (input.name !== undefined) changes.name = input.name;
    if (input.components !== undefined) changes.components = input.components;
    await tx.update(measurementSetup).set(changes).where(eq(measurementSetup.id, id));
    if (input.is_default && !before.is_default) {
      const [old] = await tx.select({ id: measurementSetup.id }).from(measurementSetup).where(and(eq(measurementSetup.organizationId, organizationId), eq(measurementSetup.is_default, true)));
      await makeDefault(tx, organizationId, id);
      await touchBatchesOf(tx, organizationId, old ? [old.id, id] : [id], true);
    } else if (input.components !== undefined) {
      await touchBatchesOf(tx, organizationId, [id], before.is_default);
    }
    return setupJson(await loadSetup(tx, organizationId, id));
  });
}

/** 400 unless the setup is the organisation's (a batch may not name another organisation's setup). */
export async function assertSetupOf(db: Db, organizationId: string, id: string | null | undefined) {
  if (!id) return;
  const [s] = await db.select({ id: measurementSetup.id }).from(measurementSetup).where(and(eq(measurementSetup.id, id), eq(measurementSetup.organizationId, organizationId)));
  if (!s) throw new HttpError(400, 'invalid_input', 'setup_id: no measurement setup of your organisation has that id.', { field: 'setup_id' });
}

/** The setup a batch's figures are measured with: its own, else the organisation's default, else none. */
export async function setupOfBatch(db: Db, b: Pick<BatchRow, 'organizationId' | 'setup_id'>): Promise<SetupRow | null> {
  const where = b.setup_id
    ? and(eq(measurementSetup.id, b.setup_id), eq(measurementSetup.organizationId, b.organizationId))
    : and(eq(measurementSetup.organizationId, b.organizationId), eq(measurementSetup.is_default, true));
  const [s] = await db.select().from(measurementSetup).where(where).limit(1);
  return s ?? null;
}

/** The batch's budget: its setup's components combined with the batch's own temperature coefficients. */
export async function batchBudget(db: Db, b: BatchRow): Promise<Budget | null> {
  const s = await setupOfBatch(db, b);
  if (!s) return null;
  return combineBudget(s.components as UncertaintyComponent[], { alpha_pct_per_k: b.alpha_pct_per_k, beta_pct_per_k: b.beta_pct_per_k, gamma_pct_per_k: b.gamma_pct_per_k });
}

/**
 * The batch's device records as the rules judge them: each with the expanded uncertainty of its
 * figures (the batch's budget) and the batch's nameplate. New objects; the cached records stay as they were.
 */
export function withBatchContext<T extends DeviceRow>(devices: readonly T[], budget: Budget | null, nameplate_w: number | null): T[] {
  return devices.map((d) => ({ ...d, uncertainty: deviceUncertainty(d.values, budget), nameplate_w: d.nameplate_w ?? nameplate_w }));
}

/** The judged device records of a batch (records, budget and nameplate). */
export async function judgedDevices<T extends DeviceRow>(db: Db, b: BatchRow, devices: readonly T[]): Promise<T[]> {
  return withBatchContext(devices, await batchBudget(db, b), b.nameplate_w);
}

/** The batch's setup as its evaluation names it, with the budget under the batch's own coefficients; null without one. */
export async function batchSetupRef(db: Db, b: BatchRow) {
  const s = await setupOfBatch(db, b);
  if (!s) return null;
  return { id: s.id, name: s.name, ...combineBudget(s.components as UncertaintyComponent[], { alpha_pct_per_k: b.alpha_pct_per_k, beta_pct_per_k: b.beta_pct_per_k, gamma_pct_per_k: b.gamma_pct_per_k }) };
}
