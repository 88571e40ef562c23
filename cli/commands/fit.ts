/**
 * `fit FILE... [--model single|double] [--objective true-current|implicit] [--idealities fixed|free]
 *  [--temp-c T] [--cells N] [--area-cm2 A] [--irradiance-wm2 G] [--json]`
 *
 * Key figures, flags and one diode fit per file. With --json one object per file and line:
 * {"file", "metrics", "fit", "flags"} or {"file", "error"}; the exit status is 2 when any file
 * could not be read (after processing the others) or the options are wrong.
 */
import { readFileSync } from 'node:fs';
import { parseArgs } from 'node:util';
import { analyseCurve, IvInputError, parseIvBytes } from '@/lib/iv';
import type { CurveMeta, FitResult, Flag, Metrics } from '@/lib/iv';

export const summary = 'key figures and single/double-diode fits of measured I-V files';

const USAGE = `usage: npm run --silent cli -- fit FILE... [options]

  --model single|double          model to fit (default single)
  --objective true-current|implicit
                                 residual to minimise (default true-current: the model current
                                 solved exactly at each measured voltage)
  --idealities fixed|free        double diode: n1 = 1, n2 = 2 (default) or both in [1, 2]
                                 with I01, I02 ≤ 1 µA
  --temp-c T                     cell temperature, °C (else the file's, else 25 °C)
  --cells N                      cells in series (else the file's, else 1)
  --area-cm2 A                   device area, cm² (for the efficiency)
  --irradiance-wm2 G             irradiance, W/m² (for the efficiency)
  --json                         one JSON object per file and line
`;

class UsageError extends Error {}

function numberOption(raw: string | undefined, name: string, check: (x: number) => boolean, what: string): number | undefined {
  if (raw === undefined) return undefined;
  const x = Number(raw);
  if (raw.trim() === '' || !Number.isFinite(x) || !check(x)) throw new UsageError(`--${name} must be ${what}, got "${raw}"`);
  return x;
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

/** Runs the fit command; returns the exit status. */
export async function run(argv: string[]): Promise<number> {
  let values: Record<string, string | boolean | undefined>;
  let files: string[];
  try {
    const parsed = parseArgs({
      args: argv,
      allowPositionals: true,
      strict: true,
      options: {
        model: { type: 'string' },
        objective: { type: 'string' },
        idealities: { type: 'string' },
        'temp-c': { type: 'string' },
        cells: { type: 'string' },
        'area-cm2': { type: 'string' },
        'irradiance-wm2': { type: 'string' },
        json: { type: 'boolean' },
        help: { type: 'boolean', short: 'h' },
      },
    });
    values = parsed.values;
    files = parsed.positionals;
  } catch (err) {
    console.error(`${err instanceof Error ? err.message : String(err)}\n\n${USAGE}`);
    return 2;
  }
  if (values.help) {
    console.log(USAGE);
    return 0;
  }

  let overrides: Partial<CurveMeta>;
  let model: 'single' | 'double';
  let objective: 'true-current' | 'implicit';
  let idealities: 'fixed' | 'free';
  try {
    if (files.length === 0) throw new UsageError('give at least one I-V file');
    model = (values.model ?? 'single') as 'single' | 'double';
    if (model !== 'single' && model !== 'double') throw new UsageError(`--model must be single or double, got "${String(values.model)}"`);
    objective = (values.objective ?? 'true-current') as 'true-current' | 'implicit';
    if (objective !== 'true-current' && objective !== 'implicit') throw new UsageError(`--objective must be true-current or implicit, got "${String(values.objective)}"`);
    idealities = (values.idealities ?? 'fixed') as 'fixed' | 'free';
    if (idealities !== 'fixed' && idealities !== 'free') throw new UsageError(`--idealities must be fixed or free, got "${String(values.idealities)}"`);
    overrides = {
      temp_c: numberOption(values['temp-c'] as string | undefined, 'temp-c', (x) => x > -100 && x < 250, 'a cell temperature in °C between −100 and 250'),
      cells: numberOption(values.cells as string | undefined, 'cells', (x) => Number.isInteger(x) && x >= 1 && x <= 10000, 'a whole number of cells from 1 to 10000'),
      area_cm2: numberOption(values['area-cm2'] as string | undefined, 'area-cm2', (x) => x > 0, 'a positive area in cm²'),
      irradiance_w_m2: numberOption(values['irradiance-wm2'] as string | undefined, 'irradiance-wm2', (x) => x > 0 && x <= 5000, 'an irradiance in W/m² above 0 and at most 5000'),
    };
  } catch (err) {
    console.error(`${err instanceof Error ? err.message : String(err)}\n\n${USAGE}`);
    return 2;
  }

  let failures = 0;
  const json = values.json === true;
  for (const file of files) {
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
      if (json) {
        console.log(JSON.stringify({ file, device_id: curve.meta.device_id, metrics: tidyObject(metrics), fit, flags }));
      } else {
        const temp_c = curve.meta.temp_c === undefined ? '25 °C (assumed)' : `${curve.meta.temp_c} °C`;
        const cells = curve.meta.cells === undefined ? '1 cell (assumed)' : `${curve.meta.cells} cell${curve.meta.cells > 1 ? 's' : ''}`;
        console.log(table(file, curve.meta, metrics, fit, flags, temp_c, cells) + '\n');
      }
    } catch (err) {
      failures++;
      if (!(err instanceof IvInputError)) {
        // A bug, not bad input: still one line per file, but say so.
        const message = err instanceof Error ? err.message : String(err);
        if (json) console.log(JSON.stringify({ file, error: `internal error: ${message}`, code: 'internal' }));
        else console.error(`${file}: internal error: ${message}`);
        continue;
      }
      if (json) console.log(JSON.stringify({ file, error: err.message, code: err.code, ...(err.line !== undefined ? { line: err.line } : {}) }));
      else console.error(`${file}: ${err.message}`);
    }
  }
  return failures > 0 ? 2 : 0;
}
