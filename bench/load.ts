/**
 * `npm run load [-- --quick] [-- --duration=30]`: the load run of issue 8.
 *
 * Starts the real server as a child process on loopback with a fresh data folder (demo seed),
 * warms it with two quiet passes over the read paths, then for `duration` seconds at once:
 *  - readers: 50 autocannon connections (closed loop) in a separate process (bench/load-reader.ts)
 *    cycling through the batch list, batch summaries and curve pages (sorted by Pmax, pages 1–2);
 *  - writers: 5 upload clients in this process, each posting batches of 100 synthetic curves
 *    (multipart, fetch/FormData) one after the other into its own batch.
 * Prints a table, writes artifacts/load.json and exits 1 if a target is missed: no errors at all,
 * p95 of the reads under 250 ms. Always stops the server and removes its data folder.
 */
import { spawn } from 'node:child_process';
import type { ChildProcess } from 'node:child_process';
import { existsSync, mkdirSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { api, assertLoopback, createBatch, signIn, uploadFiles } from '@/bench/api-client';
import type { Session } from '@/bench/api-client';
import type { ReaderConfig, ReaderFigures } from '@/bench/load-reader';
import { descendantPids, isAlive } from '@/bench/process-tree';
import { quantile, round } from '@/bench/stats';
import { syntheticFiles } from '@/bench/synthetic-files';
import { REPO_ROOT, startServerProcess, WARM_SERVER } from '@/tests/support/server-process';
import type { ServerProcess } from '@/tests/support/server-process';

const TARGET_READ_P95_MS = 250;
const DESIGNER = { email: 'dana.lindqvist@kestrel-pv.example', password: 'kestrel-design-demo' }; // sample-data/demo-accounts.json
const ENGINEER = { email: 'tomas.reyes@kestrel-pv.example', password: 'kestrel-test-demo' };

type Options = { duration_s: number; connections: number; uploaders: number; batchSize: number; quick: boolean };

function options(argv: string[]): Options {
  const quick = argv.includes('--quick');
  const num = (name: string, fallback: number, min = 1) => {
    const raw = argv.find((a) => a.startsWith(`--${name}=`))?.split('=')[1];
    const v = raw === undefined ? fallback : Number(raw);
    if (!(Number.isInteger(v) && v >= min)) throw new Error(`--${name} must be a whole number from ${min}, got ${raw}`);
    return v;
  };
  return {
    quick,
    duration_s: num('duration', quick ? 10 : 30),
    connections: num('connections', quick ? 20 : 50),
    uploaders: num('uploaders', quick ? 2 : 5, 0), // 0: reads alone, to tell their own cost from the uploads'
    batchSize: num('batch-size', quick ? 20 : 100),
  };
}

type UploadRecord = { client: number; ms: number; status: number | null; accepted: number; error?: string };

/** One upload client: posts `batchSize` new curves at a time until `until`, one request after the other. */
async function uploadClient(k: number, s: Session, batchId: string, batchSize: number, until: number, hardStop: AbortSignal): Promise<UploadRecord[]> {
  const out: UploadRecord[] = [];
  for (let round = 0; Date.now() < until && !hardStop.aborted; round++) {
    const files = syntheticFiles(batchSize, { prefix: `LOAD${k}R${round}`, seed: 1000 * k + round });
    const t0 = performance.now();
    try {
      const r = await uploadFiles(s, batchId, files, hardStop);
      const accepted = 'accepted' in r.body ? r.body.accepted : 0;
      const ms = performance.now() - t0;
      out.push({ client: k, ms, status: r.status, accepted, ...(r.status !== 201 || accepted !== batchSize ? { error: `status ${r.status}, ${accepted}/${batchSize} accepted` } : {}) });
    } catch (err) {
      out.push({ client: k, ms: performance.now() - t0, status: null, accepted: 0, error: (err as Error).message });
    }
  }
  return out;
}

/** Starts the reader process and resolves once autocannon is firing. */
function startReader(cfg: ReaderConfig): Promise<{ child: ChildProcess; done: Promise<number | null>; log: () => string }> {
  const child = spawn(process.execPath, [path.join(REPO_ROOT, 'node_modules', 'tsx', 'dist', 'cli.mjs'), path.join(REPO_ROOT, 'bench', 'load-reader.ts')], {
    cwd: REPO_ROOT,
    env: { ...process.env, QL_LOAD_CONFIG: JSON.stringify(cfg) },
    stdio: ['ignore', 'pipe', 'pipe'],
  });
  let output = '';
  const done = new Promise<number | null>((resolve) => child.on('exit', (code) => resolve(code)));
  return new Promise((resolve, reject) => {
    child.stdout!.on('data', (d) => {
      output += d;
      if (output.includes('started')) resolve({ child, done, log: () => output });
    });
    child.stderr!.on('data', (d) => (output += d));
    void done.then((code) => reject(new Error(`the reader process exited (${code}) before starting:\n${output}`)));
  });
}

const pad = (s: string | number, n: number) => String(s).padStart(n);

async function main(): Promise<number> {
  const opts = options(process.argv.slice(2));
  const workDir = mkdtempSync(path.join(os.tmpdir(), 'ql-load-'));
  let server: ServerProcess | null = null;
  let serverPids: number[] = [];
  let reader: ChildProcess | null = null;
  const abort = new AbortController();

  const cleanup = async () => {
    abort.abort();
    if (reader && reader.exitCode === null) reader.kill('SIGKILL');
    if (server) {
      const s = server;
      server = null;
      serverPids = s.child.pid ? [s.child.pid, ...descendantPids(s.child.pid)] : [];
      await s.stop().catch(() => undefined); // SIGTERM: the server closes PGlite; removes its data folder
      // tsx runs the server in a grandchild: make sure nothing of the tree is left.
      for (const p of serverPids.filter(isAlive)) process.kill(p, 'SIGKILL');
      rmSync(s.dataDir, { recursive: true, force: true });
    }
    rmSync(workDir, { recursive: true, force: true });
  };
  const onSignal = () => void cleanup().finally(() => process.exit(130));
  process.once('SIGINT', onSignal);
  process.once('SIGTERM', onSignal);

  try {
    const t0 = Date.now();
    const loadAtStart = os.loadavg();
    console.log(`load: starting the server (fresh data folder, demo seed)…`);
    server = await startServerProcess({ env: WARM_SERVER });
    assertLoopback(server.url);
    const readerSession = await signIn(server.url, DESIGNER.email, DESIGNER.password);
    const writers: Session[] = [];
    for (let k = 0; k < opts.uploaders; k++) writers.push(await signIn(server.url, ENGINEER.email, ENGINEER.password));
    const writerBatches: string[] = [];
    for (let k = 0; k < opts.uploaders; k++) writerBatches.push(await createBatch(writers[k], { name: `Load client ${k + 1}`, description: 'npm run load' }));
    const demo = (await api<{ batches: { id: string; curve_count: number }[] }>(readerSession, 'GET', '/api/batches')).batches.filter((b) => !writerBatches.includes(b.id));

    // The read mix: the batch list, each batch's summary, and curve pages sorted by Pmax.
    const paths = ['/api/batches'];
    for (const id of [...demo.map((b) => b.id), ...writerBatches]) {
      paths.push(`/api/batches/${id}`, `/api/batches/${id}/curves?page=1&page_size=50&sort=pmp_w&dir=desc`);
    }
    for (const id of writerBatches) paths.push(`/api/batches/${id}/curves?page=2&page_size=50&sort=pmp_w&dir=desc`);

    // Warm the server (JIT, caches) with two quiet passes, as a server in use would be: otherwise the
    // first burst of 50 simultaneous requests on a cold process dominates the tail.
    for (let pass = 0; pass < 2; pass++) for (const p of paths) await api(readerSession, 'GET', p);

    const out = path.join(workDir, 'reader.json');
    console.log(
      `load: ${opts.connections} reading connections for ${opts.duration_s} s over ${paths.length} paths, ` +
        `${opts.uploaders} upload clients × ${opts.batchSize} curves per request (server ready after ${((Date.now() - t0) / 1000).toFixed(1)} s)`,
    );
    const r = await startReader({ url: server.url, cookie: readerSession.cookie, connections: opts.connections, duration_s: opts.duration_s, paths, out });
    reader = r.child;
    const until = Date.now() + opts.duration_s * 1000;
    // Uploads still running long after the read window are cut off (and count as errors).
    const hardStop = setTimeout(() => abort.abort(), (opts.duration_s + 45) * 1000);
    // Event-loop probe: /api/health touches no database, so its latency is the server's longest
    // stretches of work without a break (GC, a fit, a long query), not queueing for PGlite.
    const health: number[] = [];
    const probe = (async () => {
      while (Date.now() < until && !abort.signal.aborted) {
        const t = performance.now();
        try {
          await (await fetch(`${readerSession.baseUrl}/api/health`, { signal: abort.signal })).arrayBuffer();
          health.push(performance.now() - t);
        } catch {
          /* counted by the readers */
        }
        await new Promise((res) => setTimeout(res, 100));
      }
    })();
    const uploadStart = Date.now();
    const uploads = (await Promise.all(writers.map((s, k) => uploadClient(k + 1, s, writerBatches[k], opts.batchSize, until, abort.signal)))).flat();
    clearTimeout(hardStop);
    const uploadWindow_s = (Date.now() - uploadStart) / 1000;
    await probe;
    const readerCode = await r.done;
    if (readerCode !== 0 || !existsSync(out)) throw new Error(`the reader process failed (${readerCode}):\n${r.log()}`);
    const reads = JSON.parse(readFileSync(out, 'utf8')) as ReaderFigures;

    const stored = (await api<{ batches: { id: string; curve_count: number }[] }>(readerSession, 'GET', '/api/batches')).batches.filter((b) => writerBatches.includes(b.id)).reduce((s, b) => s + b.curve_count, 0);
    const accepted = uploads.reduce((s, u) => s + u.accepted, 0);
    const uploadErrors = uploads.filter((u) => u.error);
    const readErrors = reads.non2xx + reads.errors; // autocannon counts timeouts among its errors
    const ups = uploads.map((u) => u.ms);

    const figures = {
      date: new Date().toISOString(),
      machine: `${os.cpus().length} × ${os.cpus()[0]?.model ?? 'cpu'}, ${Math.round(os.totalmem() / 2 ** 30)} GiB, Node ${process.version}, load average at start ${loadAtStart.map((x) => x.toFixed(1)).join(' ')}`,
      options: opts,
      reads: {
        connections: opts.connections,
        requests: reads.requests,
        requests_per_s: round(reads.requests_per_s),
        latency_ms: { p50: round(reads.latency_ms.p50), p95: round(reads.latency_ms.p95), p99: round(reads.latency_ms.p99), max: round(reads.latency_ms.max) },
        by_kind: reads.by_kind,
        status: reads.status,
        errors: readErrors,
        timeouts: reads.timeouts,
      },
      health_probe_ms: { samples: health.length, p50: round(quantile(health, 0.5)), p95: round(quantile(health, 0.95)), max: round(health.length ? Math.max(...health) : NaN) },
      uploads: {
        clients: opts.uploaders,
        requests: uploads.length,
        curves_per_request: opts.batchSize,
        curves_accepted: accepted,
        curves_stored: stored,
        curves_per_s: round(accepted / uploadWindow_s),
        request_ms: { p50: round(quantile(ups, 0.5)), p95: round(quantile(ups, 0.95)), max: round(ups.length ? Math.max(...ups) : NaN) },
        errors: uploadErrors.length,
        error_messages: uploadErrors.map((u) => `client ${u.client}: ${u.error}`),
      },
      targets: { read_p95_ms: TARGET_READ_P95_MS, errors: 0 },
    };
    const checks = [
      { what: `read p95 < ${TARGET_READ_P95_MS} ms`, ok: reads.latency_ms.p95 < TARGET_READ_P95_MS, got: `${figures.reads.latency_ms.p95} ms` },
      { what: 'read errors = 0', ok: readErrors === 0, got: String(readErrors) },
      { what: 'upload errors = 0', ok: uploadErrors.length === 0, got: String(uploadErrors.length) },
      { what: 'every accepted curve stored', ok: stored === accepted, got: `${stored}/${accepted}` },
    ];

    console.log('');
    console.log(`Load — ${figures.date}, ${figures.machine}`);
    console.log(`                       requests   req/s     p50 ms   p95 ms   p99 ms   max ms   errors`);
    console.log(
      `  reads (${pad(opts.connections, 2)} conn)    ${pad(reads.requests, 8)} ${pad(figures.reads.requests_per_s, 7)} ${pad(figures.reads.latency_ms.p50, 9)} ${pad(figures.reads.latency_ms.p95, 8)} ${pad(figures.reads.latency_ms.p99, 8)} ${pad(figures.reads.latency_ms.max, 8)} ${pad(readErrors, 8)}`,
    );
    for (const [kind, k] of Object.entries(reads.by_kind)) {
      console.log(`    ${kind.padEnd(19)}${pad(k.requests, 8)} ${pad('', 7)} ${pad(round(k.p50), 9)} ${pad(round(k.p95), 8)} ${pad('', 8)} ${pad(round(k.max), 8)}`);
    }
    console.log(
      `  uploads (${opts.uploaders} × ${opts.batchSize})  ${pad(uploads.length, 8)} ${pad(round(uploads.length / uploadWindow_s), 7)} ${pad(figures.uploads.request_ms.p50, 9)} ${pad(figures.uploads.request_ms.p95, 8)} ${pad('', 8)} ${pad(figures.uploads.request_ms.max, 8)} ${pad(uploadErrors.length, 8)}`,
    );
    console.log(`  /api/health every 0.1 s (event-loop stalls): p50 ${figures.health_probe_ms.p50} ms, p95 ${figures.health_probe_ms.p95} ms, max ${figures.health_probe_ms.max} ms`);
    console.log(`  curves uploaded: ${accepted} accepted, ${stored} stored (${figures.uploads.curves_per_s} curves/s over ${uploadWindow_s.toFixed(1)} s); read status codes ${JSON.stringify(reads.status)}, timeouts (10 s) ${reads.timeouts}`);
    for (const m of figures.uploads.error_messages.slice(0, 5)) console.log(`  upload error: ${m}`);
    for (const c of checks) console.log(`  ${c.ok ? 'ok  ' : 'FAIL'} ${c.what}: ${c.got}`);
    console.log(`  total run ${((Date.now() - t0) / 1000).toFixed(1)} s`);

    mkdirSync(path.join(REPO_ROOT, 'artifacts'), { recursive: true });
    writeFileSync(path.join(REPO_ROOT, 'artifacts', 'load.json'), JSON.stringify({ ...figures, checks }, null, 2) + '\n');
    return checks.every((c) => c.ok) ? 0 : 1;
  } finally {
    await cleanup();
  }
}

main().then(
  (code) => process.exit(code),
  (err: unknown) => {
    console.error(err instanceof Error ? err.stack : String(err));
    process.exit(1);
  },
);
