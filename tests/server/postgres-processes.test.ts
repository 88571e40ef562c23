/**
 * Past one machine, as processes (issue 15, items 4 and 5): a throwaway PostgreSQL cluster
 * (scripts/pg-cluster.ts), two server processes (`server/index.ts` bundled, as `npm run serve`
 * runs it, fits left to the workers: QUASILEVEL_WORKER=0) and three worker processes
 * (`server/worker.ts` bundled, as `npm run worker`, one analysis thread each).
 *  - Fair scheduling: while one user's large upload keeps every worker busy, another user's
 *    one-file upload overtakes the large upload's queue and is fitted after at most the jobs the
 *    workers already held (pg-boss priority, analysis-jobs.ts `uploadPriority`); a refit answers
 *    with every worker held (it fits in the request). The workers are held (SIGSTOP) while each of
 *    these is sent, so the queue it meets is known whatever the machine's speed.
 *  - A worker killed with SIGKILL mid-run: every accepted curve fitted exactly once, counted in
 *    the database itself.
 *  - Both servers give the same answers (their answer caches are keyed by batch revisions read from
 *    the database), and a sign-out through one is refused by the other at once (cluster-signals.ts),
 *    although each keeps resolved sessions for ten minutes here.
 * CURVES: the issue asks 1,000; QUASILEVEL_PG_CURVES lowers it on a slow machine. Deadlines are on
 * progress (each minute some curve must land), never on the whole run: this runs on a loaded
 * 2-core CI machine beside the browser lane. Skipped where no PostgreSQL server binaries are
 * installed. The synthetic files are invented (bench/synthetic-files.ts).
 */
import { spawn } from 'node:child_process';
import type { ChildProcess } from 'node:child_process';
import path from 'node:path';
import { Client } from 'pg';
import { api, createBatch, fetchRetryingGet, signIn, uploadFiles } from '@/bench/api-client';
import type { Session, UploadResponse } from '@/bench/api-client';
import { syntheticFiles } from '@/bench/synthetic-files';
import { clusterAvailable, startCluster } from '@/scripts/pg-cluster';
import type { Cluster } from '@/scripts/pg-cluster';
import { JOBS_PER_FETCH } from '@/server/services/analysis-jobs';
import { REPO_ROOT, serverCommand, startServerProcess } from '@/tests/support/server-process';
import type { ServerProcess } from '@/tests/support/server-process';

const CURVES = Number(process.env.QUASILEVEL_PG_CURVES || 1000);
const WORKERS = 3;
/** Jobs a worker of one thread holds at most: two pollers, each fetching JOBS_PER_FETCH (analysis-jobs.ts workAnalysisJobs). */
const PER_WORKER = 2 * JOBS_PER_FETCH;
const ENGINEER = { email: 'tomas.reyes@kestrel-pv.example', password: 'kestrel-test-demo' }; // sample-data/demo-accounts.json
const QA_LEAD = { email: 'quinn.mbeki@kestrel-pv.example', password: 'kestrel-qa-demo' };

(clusterAvailable() ? describe : describe.skip)('two server processes and three workers on one PostgreSQL server', () => {
  let cluster: Cluster;
  const servers: ServerProcess[] = [];
  const workers: ChildProcess[] = [];
  let env: Record<string, string>;

  const sql = async <T,>(text: string, params: unknown[] = []): Promise<T[]> => {
    const c = new Client({ connectionString: cluster.url });
    await c.connect();
    try {
        return (await c.query(text, params)).rows as T[];
    } finally {
      await c.end();
    }
  };
  const count = async (batchId: string, status: string) =>
    (await sql<{ n: number }>('select count(*)::int as n from curve where batch_id = $1 and status = $2', [batchId, status]))[0].n;
  /** Waits for `ok`, failing only when nothing changed in `quietMs` (progress, not a whole-run deadline). */
  const until = async (ok: () => Promise<boolean>, progress: () => Promise<number>, quietMs: number, what: string) => {
    let last = await progress();
    let since = Date.now();
    while (!(await ok())) {
      const now = await progress();
      if (now !== last) [last, since] = [now, Date.now()];
      if (Date.now() - since > quietMs) throw new Error(`${what}: no progress in ${quietMs / 1000} s (at ${now})`);
      await new Promise((r) => setTimeout(r, 100));
    }
  };

  const startWorker = async () => {
    // node itself on the worker bundle, as `npm run worker` runs it (not a launcher, whose child would outlive a SIGKILL).
    const [node, bundle] = await serverCommand('worker');
    return new Promise<ChildProcess>((resolve, reject) => {
      const w = spawn(node, [bundle], { cwd: REPO_ROOT, env: { ...process.env, ...env }, stdio: ['ignore', 'pipe', 'pipe'] });
      workers.push(w);
      let out = '';
      const onData = (d: Buffer) => {
        out += d;
        if (/fitting jobs from/.test(out)) resolve(w);
      };
      w.stdout!.on('data', onData);
      w.stderr!.on('data', (d: Buffer) => process.stderr.write(`[worker ${w.pid}] ${d}`));
      w.once('exit', (code) => reject(new Error(`worker exited (${code}) before taking jobs:\n${out}`)));
    });
  };

  beforeAll(async () => {
    cluster = await startCluster();
    env = {
      DATABASE_URL: cluster.url,
      BETTER_AUTH_SECRET: 'multi-process-test-secret-0123456789abcdef',
      QUASILEVEL_WORKER: '0',
      QUASILEVEL_ANALYSIS_THREADS: '1',
      // A killed worker's jobs come back after 10 s (the servers queue them, so the servers set it).
      QUASILEVEL_JOB_EXPIRY_S: '10',
      // Resolved sessions kept ten minutes: only the signal between the servers can refuse a signed-out cookie sooner.
      QUASILEVEL_SESSION_CACHE_MS: '600000',
    };
    // One after the other: the second finds the database migrated and seeded.
    servers.push(await startServerProcess({ env, timeoutMs: 180_000 }));
    servers.push(await startServerProcess({ env, timeoutMs: 180_000 }));
    for (let k = 0; k < WORKERS; k++) await startWorker();
  }, 600_000);

  afterAll(async () => {
    for (const w of workers) if (w.exitCode === null && w.signalCode === null) w.kill('SIGKILL');
    await Promise.all(servers.map((s) => s.stop({ kill: true }).catch(() => undefined)));
    cluster?.stop();
  });

  it('a sign-out through one server is refused by the other at once', async () => {
    const [one, two] = servers;
    const s = await signIn(one.url, ENGINEER.email, ENGINEER.password);
    const onTwo: Session = { baseUrl: two.url, cookie: s.cookie };
    // The session is the database's: the second server knows it, and keeps it resolved.
    await api(onTwo, 'GET', '/api/batches');
    await api(onTwo, 'GET', '/api/batches');
    await api(s, 'POST', '/api/auth/sign-out', {});
    // Without the signal the second server would answer 200 for ten more minutes.
    const t = Date.now();
    let status = 200;
    while (status !== 401 && Date.now() - t < 30_000) {
      status = (await fetchRetryingGet(`${two.url}/api/batches`, { headers: { cookie: s.cookie } })).status;
      if (status !== 401) await new Promise((r) => setTimeout(r, 50));
    }
    expect(status).toBe(401);
    console.log(`[multi] the other server refused the signed-out cookie after ${Date.now() - t} ms`);
  }, 60_000);

  it('fairly scheduled, fitted exactly once although a worker is killed, and both servers agree', async () => {
    const [one, two] = servers;
    const engineer = await signIn(one.url, ENGINEER.email, ENGINEER.password);
    const engineerOnTwo: Session = { baseUrl: two.url, cookie: engineer.cookie };
    const qa = await signIn(two.url, QA_LEAD.email, QA_LEAD.password);

    // The large upload, through the first server. The workers are held (SIGSTOP) while it is
    // received, as if busy elsewhere, so that all of it is queued when they start on it: unheld,
    // they fit most of it before its answer, and the one-file upload below finds little to overtake.
    const large = await createBatch(engineer, { name: 'Line 3, night shift', cells: 1 });
    for (const w of workers) w.kill('SIGSTOP');
    const up = await uploadFiles(engineer, large, syntheticFiles(CURVES, { prefix: 'PGM' })).finally(() => {
      for (const w of workers) w.kill('SIGCONT');
    });
    expect(up.status).toBe(201);
    expect((up.body as UploadResponse).accepted).toBe(CURVES);
    const doneLarge = () => count(large, 'done');

    // Both servers read the batch while the fits land, filling their answer caches with passing states.
    let reading = true;
    const reads = (async () => {
      while (reading) {
        for (const s of [engineer, engineerOnTwo]) {
          const r = await fetchRetryingGet(`${s.baseUrl}/api/batches/${large}/curves?page_size=20`, { headers: { cookie: s.cookie } }).catch(() => null);
          await r?.arrayBuffer();
        }
        await new Promise((r) => setTimeout(r, 500));
      }
    })();
    try {

    // The first fits have landed: every worker is taking jobs.
    await until(async () => (await doneLarge()) >= PER_WORKER, doneLarge, 120_000, 'the first fits of the large upload');

    // One worker killed mid-run; the jobs it held come back to the other two after their expiry.
    const doneAtKill = await doneLarge();
    workers[0].kill('SIGKILL');
    expect(doneAtKill).toBeLessThan(CURVES);
    const alive = workers.slice(1);
    /** Runs `step` with the living workers held (SIGSTOP), so that the queue it meets is the one counted. */
    const held = async <T,>(step: () => Promise<T>): Promise<T> => {
      for (const w of alive) w.kill('SIGSTOP');
      try {
        return await step();
      } finally {
        for (const w of alive) w.kill('SIGCONT');
      }
    };

    // Another user's one-file upload, through the second server, while much of the large one is queued.
    const small = await createBatch(qa, { name: 'Retest after lamination', cells: 1 });
    const { smallCurve, queuedLarge, doneAtUpload } = await held(async () => {
      const one1 = await uploadFiles(qa, small, syntheticFiles(1, { prefix: 'PGS', seed: 11 }));
      expect(one1.status).toBe(201);
      return { smallCurve: ((one1.body as UploadResponse).results[0] as { curve_id?: string }).curve_id!, queuedLarge: await count(large, 'queued'), doneAtUpload: await doneLarge() };
    });
    const t0 = Date.now();
    await until(async () => (await count(small, 'done')) === 1, doneLarge, 60_000, 'the one-file upload');
    const waitedMs = Date.now() - t0;
    const doneMeanwhile = (await doneLarge()) - doneAtUpload;
    console.log(`[multi] one-file upload fitted ${waitedMs} ms after the workers went on; ${doneMeanwhile} of the large upload's curves landed meanwhile; ${queuedLarge} were queued before it`);
    // It went ahead of the large upload's queue: of the large upload's jobs, only those fetched in the
    // same instant as its job was queued started before it (pg-boss's own start stamps, whatever the load),
    // and some queued before it started after it.
    const [{ ahead, overtaken }] = await sql<{ ahead: number; overtaken: number }>(
      `select count(*) filter (where j.started_on > s.created_on and j.started_on < s.started_on)::int as ahead,
              count(*) filter (where j.created_on < s.created_on and (j.started_on is null or j.started_on > s.started_on))::int as overtaken
         from pgboss.job j, pgboss.job s
        where s.id = $1 and j.name = 'analysis' and j.id::text in (select id from curve where batch_id = $2)`,
      [smallCurve, large],
    );
    console.log(`[multi] ${ahead} of the large upload's jobs started between the one-file job's queueing and its start; it overtook ${overtaken}`);
    expect(queuedLarge).toBeGreaterThan(0);
    expect(overtaken).toBeGreaterThan(0);
    expect(ahead).toBeLessThanOrEqual(WORKERS * PER_WORKER);
    expect(waitedMs).toBeLessThan(45_000); // "a few seconds"; generous for a loaded CI machine

    // A refit fits in the request on the server's own threads: it answers with every worker held.
    const { refit, refitMs, queuedAtRefit } = await held(async () => {
      const t1 = Date.now();
      const r = await api<{ fits: unknown[] }>(qa, 'POST', `/api/curves/${smallCurve}/refit`, { model: 'both' });
      return { refit: r, refitMs: Date.now() - t1, queuedAtRefit: (await count(large, 'queued')) + (await count(large, 'fitting')) };
    });
    console.log(`[multi] refit answered in ${refitMs} ms with the workers held; ${queuedAtRefit} of the large upload not yet fitted`);
    expect(refit.fits.length).toBeGreaterThan(0);
    expect(queuedAtRefit).toBeGreaterThan(0);
    expect(refitMs).toBeLessThan(45_000);

    await until(async () => (await doneLarge()) === CURVES, doneLarge, 60_000, 'the large upload');
    } finally {
      reading = false;
      await reads;
    }

    // Counted in the database: every curve done, two fits each (single and double diode), none twice.
    const [{ fits, curves }] = await sql<{ fits: number; curves: number }>(
      'select count(*)::int as fits, count(distinct f.curve_id)::int as curves from fit f join curve c on c.id = f.curve_id where c.batch_id = $1',
      [large],
    );
    expect(curves).toBe(CURVES);
    expect(fits).toBe(2 * CURVES);
    expect(await sql('select curve_id, model from fit where current group by curve_id, model having count(*) > 1')).toEqual([]);
    const [{ n: fitted }] = await sql<{ n: number }>('select count(*)::int as n from curve where batch_id = $1 and fitted and record is not null', [large]);
    expect(fitted).toBe(CURVES);

    // Both servers give the same answers, byte for byte, about the final state.
    const both = async (pathName: string) => {
      const [a, b] = await Promise.all([engineer, engineerOnTwo].map(async (s) => {
        const r = await fetchRetryingGet(`${s.baseUrl}${pathName}`, { headers: { cookie: s.cookie } });
        expect(r.status).toBe(200);
        return r.text();
      }));
      expect(b).toBe(a);
      return JSON.parse(a);
    };
    const page = await both(`/api/batches/${large}/curves?page_size=20`);
    expect(page.total).toBe(CURVES);
    expect(page.curves.every((c: { status: string; fits: unknown[] }) => c.status === 'done' && c.fits.length === 2)).toBe(true);
    expect((await both(`/api/batches/${large}/fits`)).counts).toEqual({ queued: 0, fitting: 0, done: CURVES, failed: 0 });
    const list = await both('/api/batches');
    expect(list.batches.find((b: { id: string }) => b.id === large).curve_count).toBe(CURVES);
    await both(`/api/batches/${large}`);
  }, 1_200_000);
});
