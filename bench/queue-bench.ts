/**
 * Upload-to-fitted past one machine (issue 15): one multipart upload of 1,000 synthetic curves
 * (100 with --quick) through a real server process, timed from the start of the request until
 * every curve is fitted and stored (status `done`, counted in the database):
 *  - embedded: `server/index.ts` on PGlite; the fits run in the request on the server's threads;
 *  - PostgreSQL, 1 and 3 workers: a throwaway cluster (scripts/pg-cluster.ts), the server with
 *    QUASILEVEL_WORKER=0 and `server/worker.ts` processes of one analysis thread each taking the
 *    queued fits. Skipped with a message where no PostgreSQL server binaries are installed.
 * Also what grows with what: rows written per curve (every table, counted before and after) and
 * the database's size per 10,000 curves (pg_database_size; the PGlite folder on disk), and the CPU
 * seconds each process spent on the upload (the server's by thread).
 */
import { spawn } from 'node:child_process';
import type { ChildProcess } from 'node:child_process';
import { readdirSync, readFileSync, statSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { Client } from 'pg';
import { createBatch, signIn, uploadFiles } from '@/bench/api-client';
import { round } from '@/bench/stats';
import { syntheticFiles } from '@/bench/synthetic-files';
import { clusterAvailable, startCluster } from '@/scripts/pg-cluster';
import { REPO_ROOT, serverCommand, startServerProcess, WARM_SERVER } from '@/tests/support/server-process';

const ENGINEER = { email: 'tomas.reyes@kestrel-pv.example', password: 'kestrel-test-demo' }; // sample-data/demo-accounts.json

function folderBytes(dir: string): number {
  let n = 0;
  for (const e of readdirSync(dir, { withFileTypes: true })) {
    const p = path.join(dir, e.name);
    n += e.isDirectory() ? folderBytes(p) : statSync(p).size;
  }
  return n;
}

async function query<T>(url: string, text: string, params: unknown[] = []): Promise<T[]> {
  const c = new Client({ connectionString: url });
  await c.connect();
  try {
    return (await c.query(text, params)).rows as T[];
  } finally {
    await c.end();
  }
}

/** Rows in every table of the database (pgboss's too), by schema.table. */
async function rowCounts(url: string): Promise<Record<string, number>> {
  // Partitioned tables once (pg-boss keeps each queue's jobs in a partition of pgboss.job).
  const tables = await query<{ t: string }>(
    url,
    "select quote_ident(n.nspname) || '.' || quote_ident(c.relname) as t from pg_class c join pg_namespace n on n.oid = c.relnamespace where c.relkind in ('r', 'p') and not c.relispartition and n.nspname in ('public', 'pgboss')",
  );
  const out: Record<string, number> = {};
  for (const { t } of tables) out[t] = (await query<{ n: number }>(url, `select count(*)::int as n from ${t}`))[0].n;
  return out;
}

async function startWorker(env: Record<string, string>): Promise<ChildProcess> {
  // The worker bundle, as `npm run worker` runs it (tests/support/server-process.ts builds it when stale).
  const [node, bundle] = await serverCommand('worker');
  return new Promise((resolve, reject) => {
    const w = spawn(node, [bundle], { cwd: REPO_ROOT, env: { ...process.env, ...env }, stdio: ['ignore', 'pipe', 'pipe'] });
    let out = '';
    w.stdout!.on('data', (d: Buffer) => {
      out += d;
      if (/fitting jobs from/.test(out)) resolve(w);
    });
    w.stderr!.on('data', (d: Buffer) => (out += d));
    w.once('exit', (code) => reject(new Error(`worker exited (${code}):\n${out}`)));
  });
}

/** CPU seconds (user + system) of a process's threads so far, by thread name (/proc, Linux; empty elsewhere). */
function threadCpu(pid: number | undefined): Record<string, number> {
  const out: Record<string, number> = {};
  if (!pid) return out;
  const tick = 100; // USER_HZ on Linux
  try {
    for (const tid of readdirSync(`/proc/${pid}/task`)) {
      const stat = readFileSync(`/proc/${pid}/task/${tid}/stat`, 'utf8');
      const name = tid === String(pid) ? 'main' : `${readFileSync(`/proc/${pid}/task/${tid}/comm`, 'utf8').trim()}#${tid}`;
      const f = stat.slice(stat.lastIndexOf(')') + 2).split(' ');
      out[name] = (out[name] ?? 0) + (Number(f[11]) + Number(f[12])) / tick;
    }
  } catch {
    /* not Linux, or the process ended */
  }
  return out;
}

/** CPU seconds each thread group spent between two threadCpu readings, largest first. */
/** CPU seconds of every process of the PostgreSQL cluster (postmaster and backends; those that ended are not counted). */
function postgresCpu(): number {
  let ticks = 0;
  for (const pid of readdirSync('/proc').filter((d) => /^\d+$/.test(d))) {
    try {
      if (readFileSync(`/proc/${pid}/comm`, 'utf8').trim() !== 'postgres') continue;
      const stat = readFileSync(`/proc/${pid}/stat`, 'utf8');
      const f = stat.slice(stat.lastIndexOf(')') + 2).split(' ');
      ticks += Number(f[11]) + Number(f[12]);
    } catch {
      /* ended meanwhile */
    }
  }
  return ticks / 100;
}

const processCpu = (pid: number | undefined) => Object.values(threadCpu(pid)).reduce((a, b) => a + b, 0);

function cpuSpent(before: Record<string, number>, after: Record<string, number>): Record<string, number> {
  const spent = Object.entries(after).map(([k, v]) => [k, round(v - (before[k] ?? 0))] as const).filter(([, v]) => v > 0);
  return Object.fromEntries(spent.sort((a, b) => b[1] - a[1]));
}

type Run = { curves: number; upload_answer_s: number; upload_to_fitted_s: number; curves_per_s: number };

/** One upload of `files` through the server at `url`; resolves when `fitted()` reaches the count. */
async function timedUpload(url: string, curves: number, fitted: (batchId: string) => Promise<number>): Promise<Run & { batchId: string }> {
  const s = await signIn(url, ENGINEER.email, ENGINEER.password);
  const batchId = await createBatch(s, { name: `Queue bench ${curves}`, description: 'npm run bench' });
  const files = syntheticFiles(curves, { prefix: 'QBENCH', seed: 5_015 });
  const t0 = performance.now();
  const up = await uploadFiles(s, batchId, files);
  const answered = performance.now() - t0;
  if (up.status !== 201 || !('accepted' in up.body) || up.body.accepted !== curves) throw new Error(`queue bench upload: ${up.status} ${JSON.stringify(up.body).slice(0, 300)}`);
  while ((await fitted(batchId)) < curves) await new Promise((r) => setTimeout(r, 50));
  const total = performance.now() - t0;
  return { batchId, curves, upload_answer_s: round(answered / 1000), upload_to_fitted_s: round(total / 1000), curves_per_s: round(curves / (total / 1000)) };
}

export async function benchQueue(opts: { quick?: boolean; embeddedOnly?: boolean; postgresOnly?: boolean; pgStatements?: boolean; nodeArgs?: string[] } = {}): Promise<Record<string, unknown>> {
  const curves = opts.quick ? 100 : 1000;
  const out: Record<string, unknown> = { curves };
  console.log(`queue — upload-to-fitted, ${curves} curves, one multipart request, through server processes`);

  // Embedded: the fits in the request; done when the answer comes. Three uploads into new batches
  // of one server (one with --quick): the figure is their median, as the same upload on this shared
  // 2-core VM varies by ±10 % from run to run; the first (right after the server's start) is shown too.
  if (!opts.postgresOnly) {
    const server = await startServerProcess({ timeoutMs: 180_000, nodeArgs: opts.nodeArgs, env: WARM_SERVER });
    try {
      const dbDir = path.join(server.dataDir, 'db');
      const runs: { r: Run; cpu: Record<string, number>; grown: number }[] = [];
      for (let k = 0; k < (opts.quick ? 1 : 3); k++) {
        const before = folderBytes(dbDir);
        const cpuBefore = threadCpu(server.child.pid);
        const r = await timedUpload(server.url, curves, async () => curves);
        // The server's CPU time by thread: a figure that a busy shared machine stretches less than the wall time.
        runs.push({ r, cpu: cpuSpent(cpuBefore, threadCpu(server.child.pid)), grown: folderBytes(dbDir) - before });
        console.log(`  upload ${k + 1}: ${r.upload_to_fitted_s} s; server CPU, s: ${Object.entries(runs[k].cpu).map(([n, v]) => `${n} ${v}`).join(', ')}; load average ${os.loadavg().map((x) => x.toFixed(1)).join(' ')}`);
      }
      const mid = [...runs].sort((a, b) => a.r.upload_to_fitted_s - b.r.upload_to_fitted_s)[Math.floor(runs.length / 2)];
      out.embedded = {
        ...mid.r,
        batchId: undefined,
        runs_s: runs.map((x) => x.r.upload_to_fitted_s),
        server_cpu_s: mid.cpu,
        db_folder_growth_MB_per_10000_curves: round(((mid.grown / curves) * 10_000) / 1e6),
      };
      // QUASILEVEL_DEBUG_UPLOAD=1: the server's stage times (server/services/upload-timing.ts).
      for (const line of server.log().split('\n')) if (line.startsWith('[upload]')) console.log(`  ${line}`);
      console.log(`  embedded (PGlite, fits in the request)      ${mid.r.upload_to_fitted_s} s median of ${runs.length}  (${mid.r.curves_per_s} curves/s; data folder grows ${(out.embedded as { db_folder_growth_MB_per_10000_curves: number }).db_folder_growth_MB_per_10000_curves} MB per 10,000 curves)`);
    } finally {
      await server.stop();
    }
  }

  if (opts.embeddedOnly) return out;
  if (!clusterAvailable()) {
    const why = 'skipped: no PostgreSQL server binaries here (/usr/lib/postgresql/<version>/bin; apt-get install postgresql)';
    console.log(`  PostgreSQL: ${why}`);
    out.postgres = why;
    return out;
  }

  const cluster = await startCluster(opts.pgStatements ? { settings: ['shared_preload_libraries=pg_stat_statements'] } : {});
  const env = { DATABASE_URL: cluster.url, BETTER_AUTH_SECRET: 'queue-bench-secret-0123456789abcdef', QUASILEVEL_WORKER: '0', QUASILEVEL_ANALYSIS_THREADS: '1' };
  const workers: ChildProcess[] = [];
  const server = await startServerProcess({ env: { ...WARM_SERVER, ...env }, timeoutMs: 180_000, nodeArgs: opts.nodeArgs }).catch((err) => {
    cluster.stop();
    throw err;
  });
  // One connection for the polling: a new one per poll costs the cluster a backend's start each time (~20 a second).
  const poller = new Client({ connectionString: cluster.url });
  try {
    await poller.connect();
    const done = async (batchId: string) => (await poller.query<{ n: number }>("select count(*)::int as n from curve where batch_id = $1 and status = 'done'", [batchId])).rows[0].n;
    const runs: Record<string, unknown> = {};
    let growth: Record<string, unknown> = {};
    for (const n of [1, 3]) {
      while (workers.length < n) workers.push(await startWorker(env));
      const rowsBefore = await rowCounts(cluster.url);
      const [{ size: sizeBefore }] = await query<{ size: string }>(cluster.url, 'select pg_database_size(current_database())::text as size');
      const cpuOf = () => ({ server: processCpu(server.child.pid), workers: workers.map((w) => processCpu(w.pid)), postgres: postgresCpu() });
      if (opts.pgStatements) await query(cluster.url, 'create extension if not exists pg_stat_statements; select pg_stat_statements_reset()');
      const cpuBefore = cpuOf();
      const r = await timedUpload(server.url, curves, done);
      const cpuAfter = cpuOf();
      // --pg-statements: the statements that took longest (their time includes waits for row locks).
      if (opts.pgStatements) for (const q of await query<{ ms: number; calls: number; query: string }>(cluster.url, "select round(total_exec_time)::int as ms, calls::int, left(regexp_replace(query, '\\s+', ' ', 'g'), 140) as query from pg_stat_statements order by total_exec_time desc limit 12")) console.log(`      ${String(q.ms).padStart(6)} ms  ${String(q.calls).padStart(5)}×  ${q.query}`);
      const cpu = { server: round(cpuAfter.server - cpuBefore.server), workers: cpuAfter.workers.map((c, k) => round(c - (cpuBefore.workers[k] ?? 0))), postgres: round(cpuAfter.postgres - cpuBefore.postgres) };
      runs[`workers_${n}`] = { ...r, batchId: undefined, per_worker_curves_per_s: round(r.curves_per_s / n), cpu_s: cpu };
      console.log(`  PostgreSQL, ${n} worker process(es) × 1 thread     ${r.upload_to_fitted_s} s  (${r.curves_per_s} curves/s, ${round(r.curves_per_s / n)} per worker; upload answered in ${r.upload_answer_s} s)`);
      console.log(`    CPU, s: server ${cpu.server}, workers ${cpu.workers.join(' + ')}, PostgreSQL ${cpu.postgres}; load average ${os.loadavg().map((x) => x.toFixed(1)).join(' ')}`);
      if (n === 1) {
        const rowsAfter = await rowCounts(cluster.url);
        const [{ size: sizeAfter }] = await query<{ size: string }>(cluster.url, 'select pg_database_size(current_database())::text as size');
        const perCurve: Record<string, number> = {};
        // Tables that grow with the curves (not the one batch and the one sign-in of the run).
        for (const [t, k] of Object.entries(rowsAfter)) if (k - (rowsBefore[t] ?? 0) >= curves / 100) perCurve[t] = round((k - (rowsBefore[t] ?? 0)) / curves);
        growth = { rows_per_curve: perCurve, db_size_MB_per_10000_curves: round((((Number(sizeAfter) - Number(sizeBefore)) / curves) * 10_000) / 1e6) };
        console.log(`  rows per curve: ${Object.entries(perCurve).map(([t, k]) => `${t} ${k}`).join(', ')}`);
        console.log(`  database size per 10,000 curves: ${growth.db_size_MB_per_10000_curves} MB`);
      }
    }
    out.postgres = { mode: 'server with QUASILEVEL_WORKER=0, worker processes of 1 analysis thread, all on this machine', ...runs, ...growth };
  } finally {
    await poller.end().catch(() => undefined);
    for (const w of workers) w.kill('SIGTERM');
    await Promise.all(workers.map((w) => (w.exitCode === null && w.signalCode === null ? new Promise((r) => w.once('exit', r)) : null)));
    await server.stop();
    cluster.stop();
  }
  return out;
}
