/**
 * `strings`: how many modules fit in series before the coldest morning's open-circuit
 * voltage reaches the system limit. `--json` prints one JSON object; errors exit 2.
 */
import { parseArgs } from 'node:util';
import { cautionText, ELV_LIMIT_V, HV_CAUTION, isAboveElv } from '@/lib/strings/cautions';
import { StringSizingError } from '@/lib/strings/errors';
import { sizeString, type StringSizingInput, type StringSizingResult } from '@/lib/strings/size-string';

export const summary = 'most/least modules per series string from Voc, its coefficient and the coldest day';

const NUMBER_OPTIONS = {
  'voc-v': 'module Voc at STC, V (use the batch\'s highest)',
  'beta-pct-per-k': 'Voc temperature coefficient, %/K (negative for silicon, e.g. -0.3)',
  'tmin-c': 'site record low ambient temperature, °C',
  'vsys-v': 'maximum system voltage, V DC (e.g. 1000 or 1500)',
  'tcell-max-c': 'highest cell temperature, °C (for --mpp-min-v)',
  'vmp-v': 'module Vmp at STC, V (for --mpp-min-v)',
  'beta-vmp-pct-per-k': 'Vmp temperature coefficient, %/K (for --mpp-min-v)',
  'mpp-min-v': 'inverter MPP window minimum, V',
  'mpp-max-v': 'inverter MPP window maximum, V',
} as const;
type NumberOption = keyof typeof NUMBER_OPTIONS;

const USAGE = [
  'usage: npm run --silent cli -- strings --voc-v V --beta-pct-per-k B --tmin-c T --vsys-v L [--json]',
  '',
  ...Object.entries(NUMBER_OPTIONS).map(([k, d]) => `  --${k.padEnd(20)} ${d}`),
  `  --${'json'.padEnd(20)} print one JSON object`,
  '',
  'Negative numbers may follow the option directly: --tmin-c -25 or --tmin-c=-25.',
].join('\n');

class UsageError extends Error {}

/**
 * node:util parseArgs refuses "--tmin-c -25" as ambiguous; a negative number right after one
 * of our numeric options is its value, so join the pair as "--tmin-c=-25" first.
 */
function joinNegativeValues(argv: string[]): string[] {
  const out: string[] = [];
  for (let i = 0; i < argv.length; i++) {
    const a = argv[i];
    const next = argv[i + 1];
    if (a.startsWith('--') && a.slice(2) in NUMBER_OPTIONS && next !== undefined && /^[-−]\d|^[-−]\.\d/.test(next)) {
      out.push(`${a}=${next}`);
      i += 1;
    } else {
      out.push(a);
    }
  }
  return out;
}

function toNumber(name: string, text: string | undefined): number | undefined {
  if (text === undefined) return undefined;
  const t = text.trim().replace(/^−/, '-');
  if (!/^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/.test(t)) throw new UsageError(`--${name} "${text}" is not a number`);
  return Number(t);
}

function parse(argv: string[]): { input: StringSizingInput; json: boolean; help: boolean } {
  const options = Object.fromEntries(Object.keys(NUMBER_OPTIONS).map((k) => [k, { type: 'string' as const }]));
  let values: Record<string, string | boolean | undefined>;
  try {
    ({ values } = parseArgs({
      args: joinNegativeValues(argv),
      options: { ...options, json: { type: 'boolean' }, help: { type: 'boolean', short: 'h' } },
      strict: true,
      allowPositionals: false,
    }));
  } catch (err) {
    throw new UsageError(err instanceof Error ? err.message : String(err));
  }
  const num = (k: NumberOption) => toNumber(k, values[k] as string | undefined);
  const mppMin = num('mpp-min-v');
  const mppMax = num('mpp-max-v');
  if ((mppMin === undefined) !== (mppMax === undefined)) {
    throw new UsageError('give both --mpp-min-v and --mpp-max-v, or neither');
  }
  const input: StringSizingInput = {
    voc_stc_v: num('voc-v') as number,
    beta_voc_pct_per_k: num('beta-pct-per-k') as number,
    t_min_c: num('tmin-c') as number,
    v_sys_v: num('vsys-v') as number,
    t_cell_max_c: num('tcell-max-c'),
    vmp_stc_v: num('vmp-v'),
    beta_vmp_pct_per_k: num('beta-vmp-pct-per-k'),
    mpp_window_min_v: mppMin,
    mpp_window_max_v: mppMin === undefined ? undefined : mppMax,
  };
  const missing = (['voc-v', 'beta-pct-per-k', 'tmin-c', 'vsys-v'] as const).filter((k) => values[k] === undefined);
  if (missing.length) throw new UsageError(`missing ${missing.map((k) => `--${k}`).join(', ')}`);
  return { input, json: values.json === true, help: values.help === true };
}

/** Rounds to 1 µV: exact for any practical purpose and free of binary noise in JSON. */
const r6 = (x: number): number => Math.round(x * 1e6) / 1e6;

function jsonOf(r: StringSizingResult): Record<string, unknown> {
  const out: Record<string, unknown> = {
    voc_max_per_module_v: r6(r.voc_max_per_module_v),
    max_modules: r.max_modules,
    string_voc_max_v: r6(r.string_voc_max_v),
    margin_v: r6(r.margin_v),
  };
  if (r.min_modules !== undefined) out.min_modules = r.min_modules;
  if (r.vmp_min_per_module_v !== undefined) out.vmp_min_per_module_v = r6(r.vmp_min_per_module_v);
  if (r.max_modules_mpp !== undefined) out.max_modules_mpp = r.max_modules_mpp;
  if (r.min_modules !== undefined) out.fits = r.fits;
  out.warnings = r.warnings;
  out.caution = HV_CAUTION.short;
  return out;
}

const volts = (v: number): string => `${v.toFixed(2)} V${isAboveElv(v) ? `  ⚠ above ${ELV_LIMIT_V} V DC` : ''}`;

function tableOf(input: StringSizingInput, r: StringSizingResult): string {
  const t = `${input.t_min_c} °C`;
  const rows: [string, string][] = [
    ['Module Voc at STC', volts(input.voc_stc_v)],
    ['Voc coefficient', `${input.beta_voc_pct_per_k} %/K`],
    ['Record low temperature', t],
    ['System voltage limit', volts(input.v_sys_v)],
    [`Module Voc at ${t}`, volts(r.voc_max_per_module_v)],
    ['Most modules in series', String(r.max_modules)],
    [`String Voc at ${t}`, volts(r.string_voc_max_v)],
    ['Margin to the limit', `${r.margin_v.toFixed(2)} V (${r.margin_pct.toFixed(1)} %)`],
  ];
  if (r.vmp_min_per_module_v !== undefined) rows.push([`Module Vmp at ${input.t_cell_max_c} °C`, volts(r.vmp_min_per_module_v)]);
  if (r.min_modules !== undefined) rows.push(['Least modules (MPP window)', String(r.min_modules)]);
  if (r.max_modules_mpp !== undefined) rows.push(['Most modules (MPP window)', String(r.max_modules_mpp)]);
  const width = Math.max(...rows.map(([k]) => k.length));
  const lines = ['String sizing — design guidance only', '', ...rows.map(([k, v]) => `  ${k.padEnd(width)}  ${v}`)];
  if (r.warnings.length) lines.push('', 'Warnings:', ...r.warnings.map((w) => `  - ${w}`));
  lines.push('', cautionText());
  return lines.join('\n');
}

/** Runs the command; returns the exit status (0 ok, 2 bad input). */
export async function run(argv: string[]): Promise<number> {
  const wantsJson = argv.includes('--json');
  try {
    const { input, json, help } = parse(argv);
    if (help) {
      process.stdout.write(`${USAGE}\n`);
      return 0;
    }
    const result = sizeString(input);
    process.stdout.write(json ? `${JSON.stringify(jsonOf(result))}\n` : `${tableOf(input, result)}\n`);
    return 0;
  } catch (err) {
    if (!(err instanceof UsageError || err instanceof StringSizingError)) throw err;
    if (argv.includes('--help') || argv.includes('-h')) {
      process.stdout.write(`${USAGE}\n`);
      return 0;
    }
    if (wantsJson) {
      process.stdout.write(`${JSON.stringify({ error: err.message })}\n`);
    } else {
      process.stderr.write(`error: ${err.message}\n\n${USAGE}\n`);
    }
    return 2;
  }
}
