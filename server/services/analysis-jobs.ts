/**
 * Fits as jobs (PostgreSQL mode, DATABASE_URL set): an upload reads and checks each file, stores
 * the curve with its key figures and status `queued`, and queues one pg-boss job per curve (the
 * job's id is the curve's id). Any process that runs `workAnalysisJobs` — the server unless
 * QUASILEVEL_WORKER=0, and every `npm run worker` — takes jobs, fits the curve on its analysis
 * threads and stores the fits. Embedded mode (PGlite) has no queue: the upload fits in the request
 * on the piscina pool (analysis-pool.ts), as the code above the Analyser interface expects.
 *
 * Exactly once: the store locks the curve row and writes only while its status is not `done`, in
 * the same transaction as the fits, so a job retried after its worker died (pg-boss expiry) or
 * taken twice stores once. Fairness: jobs of small uploads get a higher pg-boss priority than
 * those of large ones (taken first, FIFO within a priority); refits never queue (they fit in the
 * request on the threads).
 */
import { and, eq, inArray, ne, sql } from 'drizzle-orm';
import PgBoss from 'pg-boss';
import type { Db } from '@/db/client';
import { batch, curve, fit } from '@/db/schema';
import type { Analyser, AnalysisOutcome } from '@/server/services/analysis-pool';
import { touchBatch } from '@/server/services/answer-cache';
import type { Tx } from '@/server/services/batch-lock';
import { batchCoefficients, loadBatch, loadWritableBatch } from '@/server/services/batches';
import { comparisonRecord, derivedColumns, storedFit } from '@/server/services/curves';

export const ANALYSIS_QUEUE = 'analysis';

/** An Analyser whose uploads queue their fits (uploads.ts checks for `queue`). */
export type QueuedAnalyser = Analyser & { queue: AnalysisQueue };

export type AnalysisQueue = {
  /** Queues a job per curve; `files` is the size of the upload they came from (small ones first). */
  enqueue: (curveIds: string[], files: number) => Promise<void>;
  /** Cancels the jobs of these curves that have not started. */
  cancel: (curveIds: string[]) => Promise<void>;
  boss: PgBoss;
};

/** Seconds before a started job whose worker went silent is given to another (QUASILEVEL_JOB_EXPIRY_S, default 60). */
function expirySeconds(): number {
  const n = Number(process.env.QUASILEVEL_JOB_EXPIRY_S || 60);
  return Number.isFinite(n) && n >= 1 ? n : 60;
}

/** pg-boss priority of an upload's jobs: higher is taken first (1 file 100, 10 files 90, 100 files 80, 1,000 files 70). */
export function uploadPriority(files: number): number {
  return Math.max(0, Math.round(100 - 10 * Math.log10(Math.max(1, files))));
}

/** Starts pg-boss on the database of `url` (its own schema `pgboss`, made on first start). */
export async function startQueue(url: string): Promise<AnalysisQueue> {
  const expiry = expirySeconds();
  const boss = new PgBoss({ connectionString: url, max: 4, maintenanceIntervalSeconds: Math.max(1, Math.min(30, Math.floor(expiry / 2))) });
  boss.on('error', (err) => console.error(`[quasilevel] job queue: ${err.message}`));
  await boss.start();
  await boss.createQueue(ANALYSIS_QUEUE, { name: ANALYSIS_QUEUE, retryLimit: 5, retryDelay: 1, expireInSeconds: expiry }).catch(() => undefined);
  return {
    boss,
    enqueue: async (curveIds, files) => {
      if (!curveIds.length) return;
      const priority = uploadPriority(files);
      await boss.insert(curveIds.map((id) => ({ id, name: ANALYSIS_QUEUE, data: { curve_id: id }, priority, retryLimit: 5, retryDelay: 1, expireInSeconds: expiry })));
    },
    cancel: async (curveIds) => {
      if (curveIds.length) await boss.cancel(ANALYSIS_QUEUE, curveIds);
    },
  };
}

type Outcome = { id: string; batchId: string; deviceId: string; outcome: AnalysisOutcome };

/** The curve columns a fitted curve's store writes, with their SQL types (one bulk update, below). */
const DONE_COLUMNS = ['metrics', 'flags', 'stc', 'isc_a', 'voc_v', 'pmp_w', 'ff', 'efficiency', 'n', 'rs_ohm', 'rsh_ohm', 'stc_pmp_w', 'iph_a', 'i0_a', 'rmse_a', 'fitted', 'flagCodes', 'record'] as const;
type DoneRow = { id: string } & Record<(typeof DONE_COLUMNS)[number], unknown>;

/**
 * Writes the fitted curves of `rows` in one statement (their rows as one JSON parameter), each only
 * while its status is not `done` or `failed`: the update locks the row and checks again, so a job
 * taken twice stores once. Answers the ids written.
 */
async function storeDone(tx: Tx, rows: DoneRow[]): Promise<Set<string>> {
  if (!rows.length) return new Set();
  const cols = DONE_COLUMNS.map((k) => curve[k]);
  const sets = sql.join(
    cols.map((c) => sql`${sql.identifier(c.name)} = x.${sql.identifier(c.name)}`),
    sql`, `,
  );
  const types = sql.join(
    cols.map((c) => sql`${sql.identifier(c.name)} ${sql.raw(c.getSQLType())}`),
    sql`, `,
  );
  const json = JSON.stringify(rows.map((r) => Object.fromEntries([['id', r.id], ...DONE_COLUMNS.map((k) => [curve[k].name, r[k]])])));
  const written = await tx.execute<{ id: string }>(
    sql`update ${curve} as c set ${sets}, status = 'done', status_reason = null from jsonb_to_recordset(${json}::jsonb) as x(id text, ${types}) where c.id = x.id and c.status not in ('done', 'failed') returning c.id`,
  );
  return new Set(written.rows.map((r) => r.id));
}

/** Fits queued curves on `analyser` and stores them; curves gone, cancelled or already done are skipped. */
export async function fitQueuedCurves(db: Db, analyser: Analyser, curveIds: string[]): Promise<void> {
  if (!curveIds.length) return;
  const rows = await db
    .select({ id: curve.id, batchId: curve.batchId, deviceId: curve.deviceId, meta: curve.meta, voltage_v: curve.voltage_v, current_a: curve.current_a, notes: curve.notes, status: curve.status, b: batch })
    .from(curve)
    .innerJoin(batch, eq(batch.id, curve.batchId))
    .where(and(inArray(curve.id, curveIds), inArray(curve.status, ['queued', 'fitting'])));
  if (!rows.length) return;
  // Marked `fitting`, and a new revision of their batches in the same statement: every server
  // process's cached answers then show `fitting`, not some `queued`.
  await db.execute(
    sql`with started as (update ${curve} set status = 'fitting' where ${inArray(curve.id, rows.map((r) => r.id))} and status = 'queued' returning batch_id)
      update ${batch} set updated_at = greatest(date_trunc('milliseconds', now()), ${batch.updatedAt} + interval '1 millisecond') where id in (select batch_id from started)`,
  );
  const outcomes: Outcome[] = await Promise.all(
    rows.map(async (r) => ({
      id: r.id,
      batchId: r.batchId,
      deviceId: r.deviceId,
      outcome: await analyser.analyse({ curve: { voltage_v: r.voltage_v, current_a: r.current_a, meta: r.meta, notes: r.notes }, idealities: 'fixed', coefficients: batchCoefficients(r.b) }),
    })),
  );
  // Everything is computed before the transaction: it holds its batches' row locks (which every
  // store of those batches waits for) for four statements, whatever the fetch's size.
  const done: DoneRow[] = [];
  const fits: (typeof fit.$inferInsert)[] = [];
  for (const { id, batchId, deviceId, outcome } of outcomes) {
    if (!outcome.ok) continue;
    const a = outcome.analysis;
    const cols = derivedColumns(a);
    done.push({ id, metrics: a.metrics, flags: a.flags, stc: a.stc, ...cols, record: comparisonRecord({ id, batch_id: batchId, device_id: deviceId }, a, cols) });
    for (const f of a.fits) fits.push({ id: crypto.randomUUID(), curveId: id, model: f.model, current: true, result: storedFit(f), conditions: a.conditions, reason: 'upload', createdBy: null });
  }
  await db.transaction(async (tx) => {
    // The batches locked (and their revision moved on) first, in one order, so two workers never
    // wait on each other crosswise; a batch released meanwhile gets nothing.
    const open = new Set<string>();
    for (const batchId of [...new Set(outcomes.map((o) => o.batchId))].sort()) {
      const [b] = await touchBatch(tx, batchId);
      if (b && b.state !== 'released') open.add(batchId);
    }
    const batchOf = new Map(outcomes.map((o) => [o.id, o.batchId]));
    const mine = (id: string) => open.has(batchOf.get(id)!);
    // Stored already (a retried or doubled job) or cancelled: the update's own check skips it.
    const written = await storeDone(tx, done.filter((d) => mine(d.id)));
    for (const { id, outcome } of outcomes) {
      if (outcome.ok || !mine(id)) continue;
      await tx
        .update(curve)
        .set({ status: 'failed', statusReason: `The fits could not be computed: ${outcome.message}` })
        .where(and(eq(curve.id, id), ne(curve.status, 'done'), ne(curve.status, 'failed')));
    }
    // The fetch's fits in one statement.
    const mineFits = fits.filter((f) => written.has(f.curveId));
    if (mineFits.length) await tx.insert(fit).values(mineFits);
  });
}

/**
 * Jobs a poller takes at a time. Each fetch costs the same few round trips (select, mark fitting,
 * store, complete) whatever its size, and each mark and store holds the batch's row lock, which the
 * upload's own stores wait for; two pollers a thread keep the thread fitting while the other one
 * talks to the database. Measured on 1,000 curves (`npm run bench -- --only=queue --postgres-only`,
 * 3 December 2026): 16 and two a thread against 4 and one took one worker from 9.9–11.8 s to
 * 5.7–7.7 s; with the store in four statements, three workers took 4.3–5.2 s at 16, 4.3–5.0 s at 32,
 * 4.3–4.6 s at 48 and 4.0–4.2 s at 64, the workers and PostgreSQL spending ~1 CPU-second less at 64
 * than at 16. A small upload's jobs wait behind at most two fetches a thread: ~0.5 s of fits at 64.
 */
export const JOBS_PER_FETCH = 64;

/**
 * Takes analysis jobs in this process: `loops` pollers (two a thread), each fetching up to
 * `perFetch` jobs and fitting them on `analyser`'s threads. A job whose handler throws is retried (pg-boss retryLimit);
 * one whose process dies expires and is retried elsewhere.
 */
export async function workAnalysisJobs(db: Db, queue: AnalysisQueue, analyser: Analyser, opts: { loops?: number; perFetch?: number } = {}): Promise<void> {
  // Curves stored `queued` whose job was never written (the database went away between the two):
  // queued again; a job that exists already is left as it is (the insert ignores known ids).
  const stranded = await db.select({ id: curve.id }).from(curve).where(inArray(curve.status, ['queued', 'fitting']));
  await queue.enqueue(stranded.map((r) => r.id), stranded.length);
  const loops = opts.loops ?? 2 * Math.max(1, analyser.threads);
  const perFetch = opts.perFetch ?? JOBS_PER_FETCH;
  for (let k = 0; k < loops; k++) {
    let id: string | undefined;
    id = await queue.boss.work<{ curve_id: string }>(ANALYSIS_QUEUE, { batchSize: perFetch, pollingIntervalSeconds: 0.5 }, async (jobs) => {
      const t = Date.now();
      await fitQueuedCurves(db, analyser, jobs.map((j) => j.data.curve_id));
      if (process.env.QUASILEVEL_DEBUG_JOBS) console.log(`[jobs] ${process.pid} fitted ${jobs.length} in ${Date.now() - t} ms`);
      // A full fetch means more are waiting: fetch again at once. (pg-boss otherwise waits out the
      // polling interval after every fetch, which held a worker to perFetch jobs per 0.5 s.)
      if (jobs.length === perFetch && id) queue.boss.notifyWorker(id);
    });
  }
}

/** Marks the batch's curves not yet started as failed (cancelled) and withdraws their jobs; answers how many. */
export async function cancelQueuedCurves(db: Db, queue: AnalysisQueue | undefined, batchId: string, byName: string): Promise<number> {
  const rows = await db
    .update(curve)
    .set({ status: 'failed', statusReason: `Cancelled by ${byName} before the fits started.` })
    .where(and(eq(curve.batchId, batchId), eq(curve.status, 'queued')))
    .returning({ id: curve.id });
  if (rows.length) {
    await queue?.cancel(rows.map((r) => r.id));
    await touchBatch(db, batchId);
  }
  return rows.length;
}

/** Counts of a batch's curves by status (progress while fits land). */
export async function fitProgress(db: Db, batchId: string): Promise<Record<'queued' | 'fitting' | 'done' | 'failed', number>> {
  const rows = await db.select({ status: curve.status, n: sql<number>`count(*)::int` }).from(curve).where(eq(curve.batchId, batchId)).groupBy(curve.status);
  const out = { queued: 0, fitting: 0, done: 0, failed: 0 };
  for (const r of rows) if (r.status in out) out[r.status as keyof typeof out] = Number(r.n);
  return out;
}

/** GET /api/batches/:id/fits: the organisation's batch's fit progress, or 404. */
export async function batchFitStatus(db: Db, organizationId: string, batchId: string) {
  const b = await loadBatch(db, organizationId, batchId);
  return { batch_id: b.id, counts: await fitProgress(db, b.id) };
}

/** POST /api/batches/:id/fits/cancel: cancels the fits not yet started (a writable batch of the organisation). */
export async function cancelBatchFits(db: Db, analyser: Analyser, who: { organizationId: string; userName: string }, batchId: string) {
  const b = await loadWritableBatch(db, who.organizationId, batchId);
  const cancelled = await cancelQueuedCurves(db, (analyser as Partial<QueuedAnalyser>).queue, b.id, who.userName);
  return { batch_id: b.id, cancelled, counts: await fitProgress(db, b.id) };
}
