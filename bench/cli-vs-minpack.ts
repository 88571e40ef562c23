/**
 * The command line against MINPACK: 200 invented 60-cell module files (bench/synthetic-files.ts)
 * fitted by `npm run --silent cli -- fit FILES... --json`, timed from outside with the process
 * start included, against bench/minpack-fit.py, which fits the same files with
 * scipy.optimize.least_squares(method='lm') and reports only its fit time (after imports and
 * file reading: an already-running Python process). Target: the command line takes less wall
 * time. Also the start of a command that does almost nothing (`ni`), target < 0.4 s.
 *
 * The runs alternate (CLI, Python, CLI, …) so that other work on the machine weighs on both;
 * medians are reported. Both fits must reach the same optimum (RMSE per file within 0.1 %).
 * `npx tsx bench/cli-vs-minpack.ts [--quick]`, or as the `cli` section of `npm run bench`.
 */
import { spawnSync } from 'node:child_process';
import { existsSync, mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { quantile, round } from '@/bench/stats';
import { syntheticFiles } from '@/bench/synthetic-files';
import { buildCliIfStale } from '@/scripts/build-cli';

const ROOT = path.resolve(__dirname, '..');
const FILES = 200;
export const TARGET_NI_START_S = 0.4;

type Run = { wall_s: number; cpu_s: number; stdout: string };

const TIME = '/usr/bin/time';
const HAS_TIME = existsSync(TIME);

/**
 * Runs a command to its end, timing its wall clock from outside (process start included) and,
 * where /usr/bin/time exists, its CPU time with all its children (npm, the shell, node and its
 * threads): on a shared machine the CPU time moves less than the wall time.
 */
function timed(cmd: string, args: string[], env: NodeJS.ProcessEnv = process.env): Run {
  const t0 = performance.now();
  const out = HAS_TIME
    ? spawnSync(TIME, ['-f', 'cpu %U %S', cmd, ...args], { cwd: ROOT, env, encoding: 'utf8', maxBuffer: 256 * 2 ** 20 })
    : spawnSync(cmd, args, { cwd: ROOT, env, encoding: 'utf8', maxBuffer: 256 * 2 ** 20 });
  const wall_s = (performance.now() - t0) / 1000;
  if (out.status !== 0) throw new Error(`${cmd} ${args.slice(0, 3).join(' ')} … exited ${out.status}: ${out.stderr.slice(0, 500)}`);
  const cpu = /cpu ([\d.]+) ([\d.]+)\s*$/.exec(out.stderr);
  return { wall_s, cpu_s: cpu ? Number(cpu[1]) + Number(cpu[2]) : NaN, stdout: out.stdout };
}

/** The 60-cell modules of the synthetic set, written to a fresh directory. */
function writeModuleFiles(count: number): { dir: string; files: string[] } {
  const dir = mkdtempSync(path.join(os.tmpdir(), 'ql-cli-bench-'));
  const files = syntheticFiles(2 * count, { prefix: 'CLIB' })
    .filter((f) => f.cells === 60)
    .map((f) => {
      const file = path.join(dir, f.name);
      writeFileSync(file, f.text);
      return file;
    });
  return { dir, files };
}

function pythonAvailable(): string | null {
  const out = spawnSync('python3', ['-c', 'import scipy, numpy; print(scipy.__version__, numpy.__version__)'], { encoding: 'utf8' });
  return out.status === 0 ? out.stdout.trim() : null;
}

type PythonAnswer = { files: number; fit_s: number; fit_cpu_s: number; converged: number; evaluations_mean: number; rmse_a: number[] };

/** Runs the benchmark; `quick` repeats each measurement 3 times instead of 7. */
export async function benchCliVsMinpack(opts: { quick?: boolean } = {}): Promise<Record<string, unknown>> {
  const quick = opts.quick ?? process.argv.includes('--quick');
  const repeats = quick ? 3 : 7;
  const scipy = pythonAvailable();
  if (!scipy) {
    console.log('CLI vs MINPACK — python3 with scipy and numpy not found; skipped');
    return { skipped: 'python3 with scipy and numpy not found' };
  }
  const built = buildCliIfStale();
  const { dir, files } = writeModuleFiles(FILES);
  try {
    const npmFit = ['run', '--silent', 'cli', '--', 'fit', ...files, '--json'];
    const oneThread = { ...process.env, QUASILEVEL_CLI_THREADS: '1' };
    const cli: number[] = [];
    const cliCpu: number[] = [];
    const cliOneThread: number[] = [];
    const python: number[] = [];
    const pythonCpu: number[] = [];
    const ni: number[] = [];
    const niCpu: number[] = [];
    let lastCli = '';
    let lastPython: PythonAnswer | null = null;
    for (let r = 0; r < repeats; r++) {
      const c = timed('npm', npmFit);
      cli.push(c.wall_s);
      cliCpu.push(c.cpu_s);
      lastCli = c.stdout;
      const p = timed('python3', [path.join('bench', 'minpack-fit.py'), ...files]);
      lastPython = JSON.parse(p.stdout) as PythonAnswer;
      python.push(lastPython.fit_s);
      pythonCpu.push(lastPython.fit_cpu_s);
      cliOneThread.push(timed('npm', npmFit, oneThread).wall_s);
      const n = timed('npm', ['run', '--silent', 'cli', '--', 'ni', '--temp-k', '300', '--json']);
      ni.push(n.wall_s);
      niCpu.push(n.cpu_s);
    }
    const nodeStart: number[] = [];
    for (let r = 0; r < repeats; r++) nodeStart.push(timed(process.execPath, ['-e', '0']).wall_s);

    // Same optimum: the CLI's RMSE against MINPACK's, file by file.
    const lines = lastCli.trim().split('\n').map((l) => JSON.parse(l) as { fit: { rmse_a: number | null; converged: boolean; elapsed_ms: number } });
    const py = lastPython as PythonAnswer;
    const ratios = lines.map((l, k) => (l.fit.rmse_a ?? Infinity) / py.rmse_a[k]);
    const sameOptimum = ratios.filter((x) => Math.abs(x - 1) <= 1e-3).length;
    const fitMs = lines.map((l) => l.fit.elapsed_ms);

    const med = (xs: number[]) => round(quantile(xs, 0.5));
    const figures = {
      files: files.length,
      points_per_file: 200,
      cells: 60,
      repeats,
      cli_wall_s_median: med(cli),
      cli_wall_s_min: round(Math.min(...cli)),
      cli_wall_s_all: cli.map((x) => round(x)),
      cli_cpu_s_median: med(cliCpu),
      cli_one_thread_wall_s_median: med(cliOneThread),
      cli_fit_ms_median: med(fitMs),
      cli_fit_s_sum: round(fitMs.reduce((s, x) => s + x, 0) / 1000),
      cli_converged: lines.filter((l) => l.fit.converged).length,
      python_fit_s_median: med(python),
      python_fit_s_min: round(Math.min(...python)),
      python_fit_s_all: python.map((x) => round(x)),
      python_fit_cpu_s_median: med(pythonCpu),
      python_converged: py.converged,
      python_evaluations_mean: round(py.evaluations_mean),
      scipy_numpy: scipy,
      same_optimum: `${sameOptimum}/${files.length}`,
      rmse_ratio_median: round(quantile(ratios, 0.5), 6),
      ni_wall_s_median: med(ni),
      ni_wall_s_min: round(Math.min(...ni)),
      ni_wall_s_all: ni.map((x) => round(x)),
      ni_cpu_s_median: med(niCpu),
      node_empty_start_s_median: med(nodeStart),
      bundle_rebuilt_first: built,
      load_average_at_end: os.loadavg().map((x) => round(x)),
      threads: os.availableParallelism(),
      ok: quantile(cli, 0.5) < quantile(python, 0.5) && quantile(ni, 0.5) < TARGET_NI_START_S,
    };
    console.log(
      [
        `CLI vs MINPACK — ${files.length} synthetic 60-cell module files × 200 points, ${repeats} alternating runs, medians${quick ? ' [quick]' : ''}`,
        `  npm run cli -- fit FILES --json, wall incl. start: ${figures.cli_wall_s_median} s (fastest ${figures.cli_wall_s_min} s; one thread: ${figures.cli_one_thread_wall_s_median} s),` +
          ` CPU incl. npm ${figures.cli_cpu_s_median} s; fits inside ${figures.cli_fit_ms_median} ms median, ${figures.cli_fit_s_sum} s summed`,
        `  MINPACK (least_squares lm, scipy/numpy ${scipy}), fit time only: ${figures.python_fit_s_median} s (fastest ${figures.python_fit_s_min} s, CPU ${figures.python_fit_cpu_s_median} s);` +
          ` ${figures.python_evaluations_mean} evaluations a fit, converged ${figures.python_converged}/${files.length}`,
        `  same optimum (RMSE within 0.1 %): ${figures.same_optimum}; CLI faster: ${quantile(cli, 0.5) < quantile(python, 0.5) ? 'ok' : 'MISSED'}`,
        `  npm run cli -- ni --temp-k 300 --json: ${figures.ni_wall_s_median} s (fastest ${figures.ni_wall_s_min} s), CPU ${figures.ni_cpu_s_median} s (target < ${TARGET_NI_START_S} s: ${quantile(ni, 0.5) < TARGET_NI_START_S ? 'ok' : 'MISSED'});` +
          ` an empty node process: ${figures.node_empty_start_s_median} s; load average at the end ${figures.load_average_at_end.join(' ')}`,
      ].join('\n'),
    );
    return figures;
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
}

if (require.main === module) {
  benchCliVsMinpack().then(
    () => process.exit(0),
    (err: unknown) => {
      console.error(err instanceof Error ? err.stack : String(err));
      process.exit(1);
    },
  );
}
