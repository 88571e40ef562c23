/**
 * `npm run bench [-- --quick] [-- --only=<section>] [-- --embedded-only | --postgres-only] [-- --json]`: runs each benchmark section in
 * turn, prints its block and a summary against the targets of issues 3 and 8, and writes all
 * figures with the date and machine to artifacts/bench.json.
 * Sections: iv-fit (the engine's fits), server (upload-to-stored, comparison grid API),
 * bundle (first-load JavaScript of the web export), cli (the command line against MINPACK),
 * first-screen (a cold visit to the sign-in page in Chromium: paint, usable form, transfer),
 * queue (upload-to-fitted of 1,000 curves: embedded, and on PostgreSQL with 1 and 3 worker processes;
 * `--embedded-only` skips the PostgreSQL runs, `--postgres-only` the embedded one; `--pg-statements`
 * prints each PostgreSQL run's slowest statements, from pg_stat_statements).
 */
import { mkdirSync, writeFileSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { benchBundle } from '@/bench/bundle';
import { benchCliVsMinpack } from '@/bench/cli-vs-minpack';
import { benchFirstScreen, TARGETS as FIRST_SCREEN_TARGETS } from '@/bench/first-screen';
import { benchIvFit } from '@/bench/iv-fit';
import { benchQueue } from '@/bench/queue-bench';
import { benchServer } from '@/bench/server-bench';
import { REPO_ROOT } from '@/tests/support/server-process';

type Section = { name: string; run: (opts: { quick: boolean; embeddedOnly: boolean; postgresOnly: boolean; pgStatements: boolean }) => Promise<Record<string, unknown>> };

const sections: Section[] = [
  { name: 'iv-fit', run: benchIvFit },
  { name: 'server', run: benchServer },
  { name: 'bundle', run: () => benchBundle() },
  { name: 'cli', run: benchCliVsMinpack },
  { name: 'first-screen', run: benchFirstScreen },
  { name: 'queue', run: benchQueue },
];

/** The machine, for the record: cores, CPU model, memory, Node, and how busy it was. */
function machine(): Record<string, unknown> {
  const cpus = os.cpus();
  return {
    cores: cpus.length,
    cpu: cpus[0]?.model ?? 'unknown',
    memory_GiB: Math.round(os.totalmem() / 2 ** 30),
    node: process.version,
    platform: `${os.platform()} ${os.release()}`,
    load_average_at_start: os.loadavg().map((x) => Number(x.toFixed(2))),
  };
}

type Line = [label: string, value: string, target: string, ok: boolean | null];

/** One line per issue-8 target, from whatever sections ran. */
function summary(results: Record<string, Record<string, unknown>>): Line[] {
  const lines: Line[] = [];
  const fitR = results['iv-fit'] as { single_median_ms?: number; double_fixed_median_ms?: number; double_free_median_ms?: number } | undefined;
  if (fitR) {
    lines.push(['single-diode fit, median per curve', `${fitR.single_median_ms} ms`, '≤ 2 ms (issue 3)', (fitR.single_median_ms ?? Infinity) <= 2]);
    lines.push(['double-diode fit (n1=1, n2=2), median per curve', `${fitR.double_fixed_median_ms} ms`, '—', null]);
    lines.push(['double-diode fit (free n1, n2), median per curve', `${fitR.double_free_median_ms} ms`, '—', null]);
  }
  const s = results.server as { upload?: { curves: number; upload_to_stored_s: number; ok: boolean }; compare?: { curves_total: number; api_new_view_no_spec: { median_ms: number }; api_one_batch_changed: { median_ms: number }; api_cold_all_batches_changed: { median_ms: number }; ok: boolean } } | undefined;
  if (s?.upload) lines.push([`upload-to-stored, ${s.upload.curves}-curve batch`, `${s.upload.upload_to_stored_s} s`, '< 10 s', s.upload.ok]);
  if (s?.compare) lines.push([`comparison grid API, ${s.compare.curves_total} curves`, `${s.compare.api_new_view_no_spec.median_ms} ms (1 batch new: ${s.compare.api_one_batch_changed.median_ms}, cold: ${s.compare.api_cold_all_batches_changed.median_ms})`, '< 300 ms', s.compare.ok]);
  const b = results.bundle as { first_load_raw_bytes?: number; first_load_gzip_bytes?: number; ok?: boolean } | undefined;
  if (b?.first_load_gzip_bytes) lines.push(['web first-load JS (raw / gzip)', `${(b.first_load_raw_bytes! / 1e6).toFixed(2)} / ${(b.first_load_gzip_bytes / 1e6).toFixed(2)} MB`, 'gzip < 1 MB', !!b.ok]);
  const f = results['first-screen'] as { fcp_median_ms?: number; usable_median_ms?: number; transfer_cold_bytes?: number } | undefined;
  if (f?.fcp_median_ms !== undefined) {
    // Before issue 19's changes (same machine, load average ~23, median of 3): see README's first-screen table.
    lines.push(['sign-in, cold: first contentful paint', `${f.fcp_median_ms} ms`, `< ${FIRST_SCREEN_TARGETS.fcp_ms} ms (before: 1848)`, f.fcp_median_ms < FIRST_SCREEN_TARGETS.fcp_ms]);
    lines.push(['sign-in, cold: form usable', `${f.usable_median_ms} ms`, `< ${FIRST_SCREEN_TARGETS.usable_ms} ms (before: 2067)`, f.usable_median_ms! < FIRST_SCREEN_TARGETS.usable_ms]);
    lines.push(['sign-in, cold: transfer', `${Math.round(f.transfer_cold_bytes! / 1000)} kB`, `< ${FIRST_SCREEN_TARGETS.transfer_bytes / 1000} kB (before: 1287)`, f.transfer_cold_bytes! < FIRST_SCREEN_TARGETS.transfer_bytes]);
  }
  const q = results.queue as { curves?: number; embedded?: { upload_to_fitted_s: number }; postgres?: string | Record<string, { upload_to_fitted_s: number; per_worker_curves_per_s: number }> } | undefined;
  if (q?.embedded) {
    lines.push([`upload-to-fitted, ${q.curves} curves, embedded`, `${q.embedded.upload_to_fitted_s} s`, '< 5 s (issue 15)', q.embedded.upload_to_fitted_s < 5]);
    if (typeof q.postgres === 'string') lines.push(['upload-to-fitted on PostgreSQL', q.postgres, '—', null]);
    else if (q.postgres) {
      const [one, three] = [q.postgres.workers_1, q.postgres.workers_3];
      lines.push([`  on PostgreSQL, 1 worker`, `${one.upload_to_fitted_s} s (${one.per_worker_curves_per_s}/s per worker)`, '—', null]);
      lines.push([`  on PostgreSQL, 3 workers`, `${three.upload_to_fitted_s} s`, '≤ embedded (issue 15)', three.upload_to_fitted_s <= q.embedded.upload_to_fitted_s]);
    }
  }
  return lines;
}

async function main(): Promise<number> {
  const quick = process.argv.includes('--quick');
  const embeddedOnly = process.argv.includes('--embedded-only');
  const postgresOnly = process.argv.includes('--postgres-only');
  const pgStatements = process.argv.includes('--pg-statements');
  const only = process.argv.find((a) => a.startsWith('--only='))?.slice('--only='.length);
  const startedAt = new Date().toISOString();
  const host = machine();
  const results: Record<string, Record<string, unknown>> = {};
  for (const section of sections) {
    if (only && section.name !== only) continue;
    results[section.name] = await section.run({ quick, embeddedOnly, postgresOnly, pgStatements });
    console.log('');
  }
  const lines = summary(results);
  if (lines.length) {
    console.log(`Summary — ${startedAt}, ${host.cores} × ${host.cpu}, Node ${host.node}, load average ${(host.load_average_at_start as number[]).join(' ')}${quick ? ' [quick]' : ''}`);
    const w = Math.max(...lines.map((l) => l[0].length));
    for (const [label, value, target, ok] of lines) console.log(`  ${label.padEnd(w)}  ${value.padEnd(26)} ${target.padEnd(18)} ${ok === null ? '' : ok ? 'ok' : 'MISSED'}`);
  }
  const record = { date: startedAt, quick, machine: host, results };
  mkdirSync(path.join(REPO_ROOT, 'artifacts'), { recursive: true });
  writeFileSync(path.join(REPO_ROOT, 'artifacts', 'bench.json'), JSON.stringify(record, null, 2) + '\n');
  console.log('\nfigures written to artifacts/bench.json');
  if (process.argv.includes('--json')) console.log(JSON.stringify(results));
  return 0;
}

main().then(
  (code) => process.exit(code),
  (err: unknown) => {
    console.error(err instanceof Error ? err.stack : String(err));
    process.exit(1);
  },
);
