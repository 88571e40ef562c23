/**
 * The read side of `npm run load`, run as its own process by bench/load.ts so the load generator
 * never shares an event loop with the server or the upload clients. Drives autocannon with the
 * paths it is given (GET, one session cookie, closed loop) and writes the figures as JSON.
 * Config (JSON) in the environment variable QL_LOAD_CONFIG; prints "started" when firing begins.
 */
import { writeFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import { assertLoopback } from '@/bench/api-client';
import { quantileSorted } from '@/bench/stats';

export type ReaderConfig = { url: string; cookie: string; connections: number; duration_s: number; paths: string[]; out: string };

export type ReaderFigures = {
  requests: number;
  duration_s: number;
  requests_per_s: number;
  latency_ms: { p50: number; p95: number; p99: number; max: number; mean: number };
  /** The same per kind of read: the batch list, a batch summary, a page of curves. */
  by_kind: Record<string, { requests: number; p50: number; p95: number; max: number }>;
  status: Record<string, number>;
  non2xx: number;
  /** Connection errors and timeouts (autocannon counts a timeout as an error too). */
  errors: number;
  timeouts: number;
};

/** The few parts of autocannon's API used here (the package ships no types). */
type Client = { requestIterator?: { currentRequest?: { path?: string } } };
type Instance = { on: (event: 'response', fn: (client: Client, status: number, bytes: number, ms: number) => void) => void };

/** The kind of read a path is, for the per-kind figures. */
function kindOf(p: string): string {
  if (p.includes('/curves')) return 'curve page';
  return /^\/api\/batches\/[^/?]+/.test(p) ? 'batch summary' : 'batch list';
}
type Result = { duration: number; errors: number; timeouts: number; non2xx: number; statusCodeStats: Record<string, { count: number }> };
type Autocannon = (
  opts: { url: string; connections: number; duration: number; timeout: number; headers: Record<string, string>; requests: { method: 'GET'; path: string }[] },
  cb: (err: Error | null, result: Result) => void,
) => Instance;

function main(): void {
  const cfg = JSON.parse(process.env.QL_LOAD_CONFIG ?? 'null') as ReaderConfig | null;
  if (!cfg) throw new Error('QL_LOAD_CONFIG is not set: bench/load-reader.ts is started by bench/load.ts');
  assertLoopback(cfg.url);
  const autocannon = createRequire(__filename)('autocannon') as Autocannon;
  const latencies: number[] = [];
  const byKind = new Map<string, number[]>();
  const instance = autocannon(
    {
      url: cfg.url,
      connections: cfg.connections,
      duration: cfg.duration_s,
      timeout: 10,
      headers: { cookie: cfg.cookie },
      requests: cfg.paths.map((p) => ({ method: 'GET' as const, path: p })),
    },
    (err, result) => {
      if (err) throw err;
      latencies.sort((a, b) => a - b);
      const status: Record<string, number> = {};
      for (const [code, s] of Object.entries(result.statusCodeStats)) status[code] = s.count;
      const figures: ReaderFigures = {
        requests: latencies.length,
        duration_s: result.duration,
        requests_per_s: latencies.length / result.duration,
        latency_ms: {
          p50: quantileSorted(latencies, 0.5),
          p95: quantileSorted(latencies, 0.95),
          p99: quantileSorted(latencies, 0.99),
          max: latencies.length ? latencies[latencies.length - 1] : NaN,
          mean: latencies.reduce((s, x) => s + x, 0) / Math.max(1, latencies.length),
        },
        status,
        by_kind: Object.fromEntries(
          [...byKind].map(([k, xs]) => {
            xs.sort((a, b) => a - b);
            return [k, { requests: xs.length, p50: quantileSorted(xs, 0.5), p95: quantileSorted(xs, 0.95), max: xs[xs.length - 1] }];
          }),
        ),
        non2xx: result.non2xx,
        errors: result.errors,
        timeouts: result.timeouts,
      };
      writeFileSync(cfg.out, JSON.stringify(figures));
    },
  );
  instance.on('response', (client, _status, _bytes, ms) => {
    latencies.push(ms);
    // autocannon moves to the next request only after this event: currentRequest is the one answered.
    const kind = kindOf(client.requestIterator?.currentRequest?.path ?? '');
    const list = byKind.get(kind) ?? [];
    list.push(ms);
    byKind.set(kind, list);
  });
  console.log('started');
}

main();
