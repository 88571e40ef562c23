/**
 * `translate FILE`: a measured I-V curve translated to another irradiance and cell temperature
 * by IEC 60891 procedure 1 or 2 (coefficients as options) or by the De Soto scaling of the
 * curve's single-diode fit (`--method model`). Prints the key figures before and after, or with
 * `--json` one object with the translated key figures and curve. Bad input exits 2.
 */
import { readFileSync } from 'node:fs';
import path from 'node:path';
import {
  formatTable,
  numberOption,
  runCommand,
  requiredNumber,
  UsageError,
  usageText,
} from '@/cli/command-line';
import { translateCurve } from '@/lib/physics/translate';
import type { Conditions, TranslationRequest, TranslationResult } from '@/lib/physics/translate';
import type { I0Law } from '@/lib/physics/fit-physics';
import { HV_CAUTION, isAboveElv } from '@/lib/strings/cautions';
import { IvInputError } from '@/lib/iv/errors';
import { fitSingleDiode } from '@/lib/iv/fit-single';
import { keyFigures } from '@/lib/iv/key-figures';
import { parseIvText } from '@/lib/iv/parse';
import type { IvCurve, Metrics } from '@/lib/iv/types';

export const summary = 'translate a measured curve to another irradiance and temperature (IEC 60891 or model)';

const METHODS = ['iec60891-1', 'iec60891-2', 'model'] as const;
type Method = (typeof METHODS)[number];

const OPTIONS = {
  method: 'iec60891-1 | iec60891-2 | model',
  'to-irradiance-wm2': 'target irradiance, W/m² (1000 for STC)',
  'to-temp-c': 'target cell temperature, °C (25 for STC)',
  'from-irradiance-wm2': 'irradiance of the measurement, W/m² (default: from the file)',
  'from-temp-c': 'cell temperature of the measurement, °C (default: from the file)',
  cells: 'cells in series (default: from the file; needed by --method model)',
  'alpha-a-per-k': 'procedure 1: Isc temperature coefficient α, A/K',
  'beta-v-per-k': 'procedure 1: Voc temperature coefficient β, V/K',
  'alpha-rel-per-k': 'procedure 2: relative Isc coefficient α, 1/K (e.g. 0.0005)',
  'beta-rel-per-k': 'procedure 2: relative Voc coefficient β, 1/K (e.g. -0.003)',
  'a-irradiance': 'procedure 2: irradiance correction factor a',
  'rs-ohm': 'procedures 1 and 2: internal series resistance, Ω',
  'kappa-ohm-per-k': 'procedures 1 and 2: curve correction factor κ, Ω/K',
  'alpha-isc-a-per-k': 'model: Isc temperature coefficient, A/K (default +0.05 %/K of Iph)',
  'i0-law': 'model: I0 temperature law, desoto (default) or ni-power',
  points: 'model: points of the translated curve (default 101)',
};
const USAGE = usageText(
  'translate FILE --to-irradiance-wm2 G --to-temp-c T --method iec60891-1|iec60891-2|model [coefficients] [--json]',
  OPTIONS,
);

/** Library input names → option names, so errors point at what the user typed. */
const FLAGS: Record<string, string> = {
  alpha_a_per_k: 'alpha-a-per-k',
  beta_v_per_k: 'beta-v-per-k',
  alpha_rel_per_k: 'alpha-rel-per-k',
  beta_rel_per_k: 'beta-rel-per-k',
  a_irradiance: 'a-irradiance',
  rs_ohm: 'rs-ohm',
  kappa_ohm_per_k: 'kappa-ohm-per-k',
  alpha_isc_a_per_k: 'alpha-isc-a-per-k',
  'to.irradiance_w_m2': 'to-irradiance-wm2',
  'to.temp_c': 'to-temp-c',
  'from.irradiance_w_m2': 'from-irradiance-wm2',
  'from.temp_c': 'from-temp-c',
  temp_c: 'to-temp-c',
  fit_temp_c: 'from-temp-c',
  cells: 'cells',
  points: 'points',
  law: 'i0-law',
};

function readCurve(file: string, overrides: IvCurve['meta']): IvCurve {
  let text: string;
  try {
    text = readFileSync(file, 'utf8');
  } catch (err) {
    throw new UsageError(`cannot read ${file}: ${(err as NodeJS.ErrnoException).code ?? String(err)}`, 'FILE');
  }
  try {
    return parseIvText(text, { fileName: path.basename(file), overrides });
  } catch (err) {
    if (err instanceof IvInputError) throw new UsageError(`${file}: ${err.message}`, 'FILE');
    throw err;
  }
}

function conditionsOf(curve: IvCurve, parsedFrom: Partial<Conditions>): Conditions {
  const irradiance = parsedFrom.irradiance_w_m2 ?? curve.meta.irradiance_w_m2;
  const temp_c = parsedFrom.temp_c ?? curve.meta.temp_c;
  if (irradiance === undefined) {
    throw new UsageError('the file does not state its irradiance: give --from-irradiance-wm2', '--from-irradiance-wm2');
  }
  if (temp_c === undefined) {
    throw new UsageError('the file does not state its cell temperature: give --from-temp-c', '--from-temp-c');
  }
  return { irradiance_w_m2: irradiance, temp_c };
}

type Fit = { iph_a: number; i0_a: number; n: number; rs_ohm: number; rsh_ohm: number; rmse_a: number };

function fitForModel(curve: IvCurve, from: Conditions, cells: number): Fit {
  const fit = fitSingleDiode(curve, { temp_c: from.temp_c, cells });
  if (!fit.converged || fit.iph_a === null || fit.i0_a == null || fit.n == null || fit.rs_ohm === null || fit.rsh_ohm === null) {
    throw new UsageError(`the single-diode fit of the curve did not converge${fit.message ? `: ${fit.message}` : ''}`, 'FILE');
  }
  return { iph_a: fit.iph_a, i0_a: fit.i0_a, n: fit.n, rs_ohm: fit.rs_ohm, rsh_ohm: fit.rsh_ohm, rmse_a: fit.rmse_a ?? NaN };
}

const FIGURE_ROWS: [keyof Metrics, string, string, (x: number) => string][] = [
  ['isc_a', 'Isc', 'A', (x) => x.toFixed(4)],
  ['voc_v', 'Voc', 'V', (x) => x.toFixed(3)],
  ['pmp_w', 'Pmax', 'W', (x) => x.toFixed(3)],
  ['imp_a', 'Imp', 'A', (x) => x.toFixed(4)],
  ['vmp_v', 'Vmp', 'V', (x) => x.toFixed(3)],
  ['ff', 'Fill factor', '%', (x) => (100 * x).toFixed(2)],
  ['efficiency', 'Efficiency', '%', (x) => (100 * x).toFixed(2)],
];

function tableOf(file: string, measured: Metrics | null, r: TranslationResult): string {
  const show = (m: Metrics | null, key: keyof Metrics, f: (x: number) => string) => {
    const v = m?.[key];
    return typeof v === 'number' ? f(v) : '—';
  };
  const cond = (c: Conditions) => `${c.irradiance_w_m2} W/m², ${c.temp_c} °C`;
  const rows = FIGURE_ROWS.map(([key, label, unit, f]) => [label, show(measured, key, f), show(r.figures, key, f), unit]);
  const header = ['', 'measured', 'translated', ''];
  const widths = [0, 1, 2].map((c) => Math.max(...[header, ...rows].map((row) => row[c].length)));
  const line = (row: string[]) => `  ${row[0].padEnd(widths[0])}  ${row[1].padStart(widths[1])}  ${row[2].padStart(widths[2])} ${row[3]}`;
  const lines = [
    `${path.basename(file)}: ${cond(r.from)} → ${cond(r.to)} (${r.method})`,
    '',
    line(header),
    ...rows.map(line),
  ];
  if (r.figures_error) lines.push('', `Key figures of the translated curve: ${r.figures_error}`);
  if (r.params) {
    lines.push(
      '',
      formatTable('Translated single-diode parameters', [
        ['Iph', r.params.iph_a.toPrecision(6), 'A'],
        ['I0', r.params.i0_a.toExponential(4), 'A'],
        ['n (per cell)', r.params.n.toPrecision(5), ''],
        ['Rs', r.params.rs_ohm.toPrecision(5), 'Ω'],
        ['Rsh', r.params.rsh_ohm.toPrecision(5), 'Ω'],
      ]),
    );
  }
  if (r.notes.length) lines.push('', 'Notes:', ...r.notes.map((n) => `  - ${n}`));
  const vocs = [measured?.voc_v, r.figures?.voc_v].filter((v): v is number => typeof v === 'number');
  if (vocs.some(isAboveElv)) lines.push('', `⚠ ${HV_CAUTION.short}`);
  return lines.join('\n');
}

/** Runs the command; returns the exit status (0 ok, 2 bad input). */
export async function run(argv: string[]): Promise<number> {
  return runCommand(argv, { options: OPTIONS, usage: USAGE, flags: FLAGS, allowPositionals: true }, async (parsed) => {
    if (parsed.positionals.length !== 1) {
      throw new UsageError(parsed.positionals.length === 0 ? 'give the I-V file to translate' : 'give exactly one I-V file', 'FILE');
    }
    const file = parsed.positionals[0];
    const method = parsed.values.method;
    if (method === undefined) throw new UsageError(`--method is required (${METHODS.join(', ')})`, '--method');
    if (!(METHODS as readonly string[]).includes(method)) {
      throw new UsageError(`--method must be one of ${METHODS.join(', ')} (got "${method}")`, '--method');
    }
    const to: Conditions = {
      irradiance_w_m2: requiredNumber(parsed, 'to-irradiance-wm2'),
      temp_c: requiredNumber(parsed, 'to-temp-c'),
    };
    const cellsOption = numberOption(parsed, 'cells');
    if (cellsOption !== undefined && !(Number.isInteger(cellsOption) && cellsOption >= 1)) {
      throw new UsageError(`--cells must be a whole number ≥ 1 (got ${cellsOption})`, '--cells');
    }
    const fromOptions: Partial<Conditions> = {
      irradiance_w_m2: numberOption(parsed, 'from-irradiance-wm2'),
      temp_c: numberOption(parsed, 'from-temp-c'),
    };
    const curve = readCurve(file, {
      ...(cellsOption !== undefined ? { cells: cellsOption } : {}),
      ...(fromOptions.irradiance_w_m2 !== undefined ? { irradiance_w_m2: fromOptions.irradiance_w_m2 } : {}),
      ...(fromOptions.temp_c !== undefined ? { temp_c: fromOptions.temp_c } : {}),
    });
    const from = conditionsOf(curve, fromOptions);
    let measured: Metrics | null = null;
    try {
      measured = keyFigures(curve).metrics;
    } catch (err) {
      if (!(err instanceof IvInputError)) throw err;
      throw new UsageError(`${file}: ${err.message}`, 'FILE');
    }

    let request: TranslationRequest;
    let fit: Fit | undefined;
    const m = method as Method;
    if (m === 'iec60891-1') {
      request = {
        method: m,
        from,
        to,
        alpha_a_per_k: numberOption(parsed, 'alpha-a-per-k') as number,
        beta_v_per_k: numberOption(parsed, 'beta-v-per-k') as number,
        rs_ohm: numberOption(parsed, 'rs-ohm') as number,
        kappa_ohm_per_k: numberOption(parsed, 'kappa-ohm-per-k') as number,
        isc1_a: measured.isc_a,
      };
    } else if (m === 'iec60891-2') {
      request = {
        method: m,
        from,
        to,
        alpha_rel_per_k: numberOption(parsed, 'alpha-rel-per-k') as number,
        beta_rel_per_k: numberOption(parsed, 'beta-rel-per-k') as number,
        rs_ohm: numberOption(parsed, 'rs-ohm') as number,
        kappa_ohm_per_k: numberOption(parsed, 'kappa-ohm-per-k') as number,
        a_irradiance: numberOption(parsed, 'a-irradiance') as number,
        voc1_v: measured.voc_v,
      };
    } else {
      const cells = curve.meta.cells;
      if (cells === undefined) throw new UsageError('the model method needs the number of cells in series: give --cells', '--cells');
      const law = parsed.values['i0-law'] ?? 'desoto';
      if (law !== 'desoto' && law !== 'ni-power') throw new UsageError(`--i0-law must be desoto or ni-power (got "${law}")`, '--i0-law');
      fit = fitForModel(curve, from, cells);
      request = {
        method: m,
        params: fit,
        cells,
        from,
        to,
        alpha_isc_a_per_k: numberOption(parsed, 'alpha-isc-a-per-k'),
        i0_law: law as I0Law,
        points: numberOption(parsed, 'points'),
      };
    }
    const result = translateCurve(curve, request);
    if (fit) result.notes.unshift(`fitted at ${from.temp_c} °C: RMSE ${fit.rmse_a.toExponential(3)} A`);

    if (parsed.json) {
      const out = {
        method: result.method,
        from: { irradiance_wm2: result.from.irradiance_w_m2, temp_c: result.from.temp_c },
        to: { irradiance_wm2: result.to.irradiance_w_m2, temp_c: result.to.temp_c },
        measured_key_figures: measured,
        key_figures: result.figures,
        ...(result.figures_error ? { key_figures_error: result.figures_error } : {}),
        ...(result.model_figures ? { model_figures: result.model_figures } : {}),
        ...(result.params ? { params: result.params } : {}),
        curve: { voltage_v: result.curve.voltage_v, current_a: result.curve.current_a },
        notes: result.notes,
        caution: HV_CAUTION.short,
      };
      process.stdout.write(`${JSON.stringify(out)}\n`);
      return 0;
    }
    process.stdout.write(`${tableOf(file, measured, result)}\n`);
    return 0;
  });
}
