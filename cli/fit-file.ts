/**
 * One file of the `fit` command: read, key figures, flags and the chosen fit, turned into the
 * text it prints (a JSON line or a readable block). Kept apart from the command so worker
 * threads (cli/fit-threads.ts) can compute files while the main thread prints them in order.
 */
import { readFileSync } from 'node:fs';
import { analyseCurve, IvInputError, parseIvBytes } from '@/lib/iv';
import type { CurveMeta, FitResult, Flag, Metrics } from '@/lib/iv';

/** How each file is read and fitted; the same for every file of one command. */
export type FitSettings = {
  overrides: Partial<CurveMeta>;
  model: 'single' | 'double';
  objective: 'true-current' | 'implicit';
  idealities: 'fixed' | 'free';
  json: boolean;
};

/** What one file prints, kept apart so a worker thread can compute it and the main thread print it in order. */
export type FileOutput = { stdout: string; stderr: string; failed: boolean };

/** Reads and fits one file; never throws: a bad file or a bug becomes its error line. */
export function fitFileOutput(file: string, settings: FitSettings): FileOutput {
  const { overrides, model, objective, idealities, json } = settings;
  try {
    let bytes: Uint8Array;
    try {
      bytes = readFileSync(file);
    } catch (err) {
      const code = (err as NodeJS.ErrnoException).code;
      throw new IvInputError('unreadable', code === 'ENOENT' ? 'no such file' : code === 'EISDIR' ? 'this is a directory, not a file' : `cannot read the file (${code ?? 'unknown error'})`);
    }
    const curve = parseIvBytes(bytes, { fileName: file, overrides });
    const { metrics, flags, fits } = analyseCurve(curve, { models: [model], objective, idealities });
    const fit = fits[0];
    if (json) return { stdout: `${JSON.stringify({ file, device_id: curve.meta.device_id, metrics: tidyObject(metrics), fit, flags })}\n`, stderr: '', failed: false };
    const temp_c = curve.meta.temp_c === undefined ? '25 °C (assumed)' : `${curve.meta.temp_c} °C`;
    const cells = curve.meta.cells === undefined ? '1 cell (assumed)' : `${curve.meta.cells} cell${curve.meta.cells > 1 ? 's' : ''}`;
    return { stdout: `${table(file, curve.meta, metrics, fit, flags, temp_c, cells)}\n\n`, stderr: '', failed: false };
  } catch (err) {
    if (!(err instanceof IvInputError)) {
      // A bug, not bad input: still one line per file, but say so.
      const message = err instanceof Error ? err.message : String(err);
      if (json) return { stdout: `${JSON.stringify({ file, error: `internal error: ${message}`, code: 'internal' })}\n`, stderr: '', failed: true };
      return { stdout: '', stderr: `${file}: internal error: ${message}\n`, failed: true };
    }
    if (json) return { stdout: `${JSON.stringify({ file, error: err.message, code: err.code, ...(err.line !== undefined ? { line: err.line } : {}) })}\n`, stderr: '', failed: true };
    return { stdout: '', stderr: `${file}: ${err.message}\n`, failed: true };
  }
}

const sig = (x: number | null | undefined, digits = 5) => (x === null || x === undefined ? '–' : Number(x.toPrecision(digits)).toString());
const tidyObject = <T extends Record<string, unknown>>(o: T): T =>
  Object.fromEntries(Object.entries(o).map(([k, v]) => [k, typeof v === 'number' ? Number(v.toPrecision(12)) : v])) as T;

function table(file: string, meta: CurveMeta, metrics: Metrics, fit: FitResult, flags: Flag[], temp_c: string, cells: string): string {
  const lines: string[] = [];
  lines.push(`${file}${meta.device_id ? `  (${meta.device_id})` : ''}  ${temp_c}, ${cells}`);
  lines.push(
    `  Isc ${sig(metrics.isc_a)} A   Voc ${sig(metrics.voc_v)} V   Pmp ${sig(metrics.pmp_w)} W at ${sig(metrics.vmp_v)} V, ${sig(metrics.imp_a)} A` +
      `   FF ${sig(metrics.ff * 100, 4)} %   efficiency ${metrics.efficiency === null ? '– (needs area and irradiance)' : `${sig(metrics.efficiency * 100, 4)} %`}`,
  );
  lines.push(`  slope at Isc: Rsh0 ${sig(metrics.rsh0_ohm, 4)} Ω   slope at Voc: Rs0 ${sig(metrics.rs0_ohm, 4)} Ω`);
  const objective = fit.objective === 'true-current' ? 'true current' : 'implicit residual';
  lines.push(`  ${fit.model} fit (${objective}): ${fit.converged ? 'converged' : 'DID NOT CONVERGE'}, ${fit.evaluations} evaluations, ${sig(fit.elapsed_ms, 3)} ms`);
  if (fit.converged) {
    const rows: [string, string, string][] =
      fit.model === 'single-diode'
        ? [
            ['Iph', 'iph_a', 'A'],
            ['I0', 'i0_a', 'A'],
            ['n', 'n', 'per cell'],
            ['Rs', 'rs_ohm', 'Ω'],
            ['Rsh', 'rsh_ohm', 'Ω'],
          ]
        : [
            ['Iph', 'iph_a', 'A'],
            ['I01', 'i01_a', 'A'],
            ['n1', 'n1', 'per cell'],
            ['I02', 'i02_a', 'A'],
            ['n2', 'n2', 'per cell'],
            ['Rs', 'rs_ohm', 'Ω'],
            ['Rsh', 'rsh_ohm', 'Ω'],
          ];
    const record = fit as unknown as Record<string, number | null>;
    for (const [label, key, unit] of rows) {
      const se = fit.stderr[key];
      lines.push(`    ${label.padEnd(4)} ${sig(record[key], 6).padStart(12)} ± ${se === null || se === undefined ? '–' : sig(se, 2)} ${unit}`);
    }
    lines.push(`    RMSE ${sig(fit.rmse_a, 5)} A, largest residual ${sig(fit.max_residual_a, 3)} A`);
  }
  if (fit.message) lines.push(`  note: ${fit.message}`);
  for (const f of flags) lines.push(`  [${f.severity}] ${f.message}`);
  return lines.join('\n');
}
