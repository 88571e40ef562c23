/**
 * PostgreSQL mode against a real server (issue 15): a throwaway cluster (scripts/pg-cluster.ts),
 * the committed migrations through DATABASE_URL's module, an upload through the API whose fits are
 * queued, worker processes (the worker bundle, as `npm run worker`) of which one is killed with
 * SIGKILL mid-run, and the rows counted in the database itself: every accepted curve fitted
 * exactly once. Skipped where no PostgreSQL server binaries are installed. The synthetic files
 * are invented (bench/synthetic-files.ts).
 */
import { spawn, spawnSync } from 'node:child_process';
import type { ChildProcess } from 'node:child_process';
import { readFileSync } from 'node:fs';
import path from 'node:path';
import { Client } from 'pg';
import { syntheticFiles } from '@/bench/synthetic-files';
import { DatabaseStartError, MIGRATIONS_DIR, databaseUrl, openPostgres } from '@/db/client';
import type { Database } from '@/db/client';
import { inlineAnalyser } from '@/server/services/analysis-pool';
import type { Analyser } from '@/server/services/analysis-pool';
import { startQueue, uploadPriority } from '@/server/services/analysis-jobs';
import type { AnalysisQueue } from '@/server/services/analysis-jobs';
import { clusterAvailable, startCluster } from '@/scripts/pg-cluster';
import type { Cluster } from '@/scripts/pg-cluster';
import { signIn, signUp, startHarness } from '@/tests/server/harness';
import { serverCommand } from '@/tests/support/server-process';
import type { Harness } from '@/tests/server/harness';

const ROOT = path.resolve(__dirname, '..', '..');
const CURVES = 240;

describe('DATABASE_URL checks (no server needed)', () => {
  it('names the variable for a malformed URL and leaves PGlite when unset', () => {
    expect(databaseUrl({})).toBeNull();
    for (const bad of ['not a url', 'mysql://h/db', 'postgres://127.0.0.1:99999/db', 'postgres://127.0.0.1:5432/']) {
      expect(() => databaseUrl({ DATABASE_URL: bad })).toThrow(DatabaseStartError);
      expect(() => databaseUrl({ DATABASE_URL: bad })).toThrow(/DATABASE_URL/);
    }
    expect(databaseUrl({ DATABASE_URL: 'postgresql://u:p@db.example:6543/ql' })?.port).toBe('6543');
  });

  it('a server with a malformed DATABASE_URL prints the reason and exits 1', async () => {
    const [node, bundle] = await serverCommand('server');
    const r = spawnSync(node, [bundle], { cwd: ROOT, encoding: 'utf8', timeout: 60_000, env: { ...process.env, DATABASE_URL: 'postgres//nohost', PORT: '0', QUASILEVEL_DATA_DIR: path.join(require('node:os').tmpdir(), `ql-badurl-${process.pid}`) } });
    expect(r.status).toBe(1);
    expect(r.stderr).toMatch(/DATABASE_URL/);
    expect(r.stderr).not.toMatch(/at .*\.ts:\d+/); // the message, not a stack
  });
});

(clusterAvailable() ? describe : describe.skip)('on a PostgreSQL server', () => {
  let cluster: Cluster;
  let database: Database;
  let queue: AnalysisQueue;
  let h: Harness;
  const workers: ChildProcess[] = [];

  beforeAll(async () => {
    process.env.QUASILEVEL_JOB_EXPIRY_S = '10'; // the jobs this process queues: a killed worker's come back in 10 s
    cluster = await startCluster();
    database = await openPostgres(databaseUrl({ DATABASE_URL: cluster.url })!);
    queue = await startQueue(cluster.url);
    // The server of this test queues fits and works none (QUASILEVEL_WORKER=0): the worker processes do.
    const analyser: Analyser = { ...inlineAnalyser(), queue } as Analyser;
    h = await startHarness({ database, analyser });
  }, 60_000);

  afterAll(async () => {
    for (const w of workers) if (w.exitCode === null) w.kill('SIGKILL');
    await queue?.boss.stop({ graceful: false, wait: true }).catch(() => undefined);
    await h?.close().catch(() => undefined);
    cluster?.stop();
  });

  const sql = async <T,>(text: string, params: unknown[] = []): Promise<T[]> => {
    const c = new Client({ connectionString: cluster.url });
    await c.connect();
    try {
      return (await c.query(text, params)).rows as T[];
    } finally {
      await c.end();
    }
  };

  it('a database that is down at start: a clear message naming DATABASE_URL', async () => {
    const down = databaseUrl({ DATABASE_URL: cluster.url.replace(`:${cluster.port}/`, ':1/') })!;
    await expect(openPostgres(down)).rejects.toThrow(/DATABASE_URL \(127\.0\.0\.1:1\/quasilevel\): the connection was refused/);
  });

  it('ran every committed migration once; opening again (two at once) changes nothing', async () => {
    const journal = JSON.parse(readFileSync(path.join(MIGRATIONS_DIR, 'meta', '_journal.json'), 'utf8')) as { entries: unknown[] };
    const again = await Promise.all([openPostgres(databaseUrl({ DATABASE_URL: cluster.url })!), openPostgres(databaseUrl({ DATABASE_URL: cluster.url })!)]);
    await Promise.all(again.map((d) => d.close()));
    const [{ n }] = await sql<{ n: number }>('select count(*)::int as n from drizzle.__drizzle_migrations');
    expect(n).toBe(journal.entries.length);
    // The released-batch guard of migration 0006 is a trigger on the server too.
    const triggers = await sql<{ tgname: string }>("select tgname from pg_trigger where tgrelid = 'curve'::regclass and not tgisinternal");
    expect(triggers.length).toBeGreaterThan(0);
  });

  it('uploads queue their fits; workers fit each curve exactly once although one is killed mid-run', async () => {
    await signUp(h.app, { email: 'admin@fab.example' }); // founds the organisation (administrator)
    const tester = await signUp(h.app, { email: 'tester@fab.example' }); // joins as test engineer
    const b = await tester.post('/api/batches').send({ name: 'Queued fits', cells: 1 });
    expect(b.status).toBe(201);
    const files = syntheticFiles(CURVES, { prefix: 'PGQ' });
    let up = tester.post(`/api/batches/${b.body.id}/curves`);
    for (const f of files) up = up.attach('files', Buffer.from(f.text), f.name);
    up = up.attach('files', Buffer.from('not an I-V file'), 'broken.csv');
    const res = await up;
    expect(res.status).toBe(201);
    // Accept or reject per file, as in embedded mode; the answer comes before the fits.
    expect(res.body.accepted).toBe(CURVES);
    expect(res.body.rejected).toBe(1);
    const page = await tester.get(`/api/batches/${b.body.id}/curves?page_size=10`);
    expect(page.status).toBe(200);
    expect(page.body.curves.every((c: { status: string; fits: unknown[] }) => c.status === 'queued' && c.fits.length === 0)).toBe(true);

    const env = { ...process.env, DATABASE_URL: cluster.url, QUASILEVEL_ANALYSIS_THREADS: '1', QUASILEVEL_JOB_EXPIRY_S: '10' };
    // The worker bundle, as `npm run worker` runs it.
    const [node, workerBundle] = await serverCommand('worker');
    const startWorker = () => {
      const w = spawn(node, [workerBundle], { cwd: ROOT, env, stdio: ['ignore', 'pipe', 'pipe'] });
      w.stderr!.on('data', (d: Buffer) => process.stderr.write(`[worker ${w.pid}] ${d}`));
      w.stdout!.on('data', (d: Buffer) => process.stderr.write(`[worker ${w.pid}] ${d}`));
      workers.push(w);
      return w;
    };
    const count = async (status: string) => (await sql<{ n: number }>('select count(*)::int as n from curve where batch_id = $1 and status = $2', [b.body.id, status]))[0].n;
    const until = async (ok: () => Promise<boolean>, ms: number) => {
      const end = Date.now() + ms;
      while (!(await ok())) {
        if (Date.now() > end) {
          const curves = await sql('select status, count(*)::int as n from curve where batch_id = $1 group by status', [b.body.id]);
          const jobs = await sql("select state, retry_count, extract(epoch from start_after - now())::int as wait_s, count(*)::int as n from pgboss.job where name = 'analysis' group by 1, 2, 3");
          const activity = await sql("select state, wait_event_type, left(query, 100) as q from pg_stat_activity where datname = 'quasilevel' and state <> 'idle'");
          console.log(JSON.stringify(activity, null, 1));
          throw new Error(`timed out; curves ${JSON.stringify(curves)}, jobs ${JSON.stringify(jobs)}`);
        }
        await new Promise((r) => setTimeout(r, 100));
      }
    };

    const first = startWorker();
    await until(async () => (await count('done')) >= 20, 120_000); // includes the worker's start
    first.kill('SIGKILL');
    const doneAtKill = await count('done');
    expect(doneAtKill).toBeLessThan(CURVES); // killed mid-run
    startWorker();
    // Deadline on progress, not on the whole run: on a loaded 2-core CI machine (the browser lane
    // beside this one) the second worker may take minutes for 220 fits, but it must keep moving.
    // The killed worker's started jobs come back after their expiry (10 s here).
    for (let done = await count('done'); done < CURVES; done = await count('done')) {
      await until(async () => (await count('done')) > done, 60_000);
    }

    // Counted in the database: every curve done, two fits each (single and double diode), none twice.
    expect(await count('done')).toBe(CURVES);
    const [{ fits, curves }] = await sql<{ fits: number; curves: number }>(
      'select count(*)::int as fits, count(distinct f.curve_id)::int as curves from fit f join curve c on c.id = f.curve_id where c.batch_id = $1',
      [b.body.id],
    );
    expect(curves).toBe(CURVES);
    expect(fits).toBe(2 * CURVES);
    const twice = await sql('select curve_id, model from fit group by curve_id, model having count(*) > 1');
    expect(twice).toEqual([]);
    const [{ n: fitted }] = await sql<{ n: number }>('select count(*)::int as n from curve where batch_id = $1 and fitted and record is not null', [b.body.id]);
    expect(fitted).toBe(CURVES);

    const after = await tester.get(`/api/batches/${b.body.id}/curves?page_size=10`);
    expect(after.body.curves.every((c: { status: string; fits: unknown[] }) => c.status === 'done' && c.fits.length === 2)).toBe(true);
    const progress = await tester.get(`/api/batches/${b.body.id}/fits`);
    expect(progress.body.counts).toEqual({ queued: 0, fitting: 0, done: CURVES, failed: 0 });
    for (const w of workers) w.kill('SIGTERM');
    await Promise.all(workers.map((w) => (w.exitCode === null && w.signalCode === null ? new Promise((r) => w.once('exit', r)) : null)));
  }, 420_000);

  it('a small upload goes before a large one; fits not started can be cancelled', async () => {
    const tester = await signIn(h.app, 'tester@fab.example', 'correct-horse-9');
    const b = await tester.post('/api/batches').send({ name: 'Cancelled fits', cells: 1 });
    let up = tester.post(`/api/batches/${b.body.id}/curves`);
    for (const f of syntheticFiles(5, { prefix: 'PGC', seed: 7 })) up = up.attach('files', Buffer.from(f.text), f.name);
    expect((await up).body.accepted).toBe(5);
    // pg-boss takes higher priorities first: this 5-file upload's jobs before those of the 241-file one above.
    const priorities = await sql<{ priority: number; n: number }>(
      "select j.priority, count(*)::int as n from pgboss.job j join curve c on c.id = j.id::text where j.name = 'analysis' group by j.priority order by j.priority",
    );
    expect(priorities).toEqual([
      { priority: uploadPriority(CURVES + 1), n: CURVES },
      { priority: uploadPriority(5), n: 5 },
    ]);
    expect(uploadPriority(5)).toBeGreaterThan(uploadPriority(CURVES + 1));

    // No worker runs now: all five are queued, and the cancel reaches all of them.
    const cancel = await tester.post(`/api/batches/${b.body.id}/fits/cancel`);
    expect(cancel.status).toBe(200);
    expect(cancel.body).toMatchObject({ cancelled: 5, counts: { queued: 0, fitting: 0, done: 0, failed: 5 } });
    const page = await tester.get(`/api/batches/${b.body.id}/curves`);
    expect(page.body.curves.map((c: { status: string; status_reason: string }) => [c.status, c.status_reason])).toEqual(Array(5).fill(['failed', expect.stringMatching(/^Cancelled by tester before the fits started\.$/)]));
    const jobs = await sql<{ state: string }>("select distinct j.state from pgboss.job j join curve c on c.id = j.id::text where c.batch_id = $1", [b.body.id]);
    expect(jobs).toEqual([{ state: 'cancelled' }]);
  });
});
