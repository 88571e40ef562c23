/**
 * `fit FILE... [--model single|double] [--objective true-current|implicit] [--idealities fixed|free]
 *  [--temp-c T] [--cells N] [--area-cm2 A] [--irradiance-wm2 G] [--json]`
 *
 * Key figures, flags and one diode fit per file. With --json one object per file and line:
 * {"file", "metrics", "fit", "flags"} or {"file", "error"}; the exit status is 2 when any file
 * could not be read (after processing the others) or the options are wrong.
 */
import { parseArgs } from 'node:util';
import type { FitSettings } from '@/cli/fit-file';
import { fitFiles } from '@/cli/fit-threads';
import type { CurveMeta } from '@/lib/iv';

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

  const settings: FitSettings = { overrides, model, objective, idealities, json: values.json === true };
  const outputs = await fitFiles(files, settings);
  return outputs.some((o) => o.failed) ? 2 : 0;
}
