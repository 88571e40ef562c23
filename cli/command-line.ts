/**
 * Option parsing and table text shared by the physics commands (ni, fermi, split, translate).
 * Pure functions: the commands do the printing. Not re-exported from lib/physics/index.ts,
 * because node:util has no place in the web bundle.
 */
import { parseArgs } from 'node:util';
import { PhysicsError } from '@/lib/physics/errors';

/** Wrong or missing command-line options; `option` is the flag as typed, e.g. "--temp-k". */
export class UsageError extends Error {
  readonly option?: string;

  constructor(message: string, option?: string) {
    super(message);
    this.name = 'UsageError';
    if (option !== undefined) this.option = option;
  }
}

/** Option name (without --) → one-line help. Every option takes a value unless listed in `flags`. */
export type OptionHelp = Record<string, string>;

export type ParsedOptions = {
  values: Record<string, string | undefined>;
  positionals: string[];
  json: boolean;
  help: boolean;
};

const NUMBER_TEXT = /^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/;

/**
 * parseArgs refuses "--eta -5" as ambiguous; a negative number right after one of our options
 * is its value, so the pair is joined as "--eta=-5" first.
 */
function joinNegativeValues(argv: string[], options: OptionHelp): string[] {
  const out: string[] = [];
  for (let k = 0; k < argv.length; k++) {
    const a = argv[k];
    const next = argv[k + 1];
    if (a.startsWith('--') && a.slice(2) in options && next !== undefined && /^[-−](\d|\.\d)/.test(next)) {
      out.push(`${a}=${next}`);
      k += 1;
    } else {
      out.push(a);
    }
  }
  return out;
}

/** Parses argv against `options` (all string-valued) plus --json and --help. */
export function parseOptions(argv: string[], options: OptionHelp, allowPositionals = false): ParsedOptions {
  const spec = Object.fromEntries(Object.keys(options).map((k) => [k, { type: 'string' as const }]));
  try {
    const { values, positionals } = parseArgs({
      args: joinNegativeValues(argv, options),
      options: { ...spec, json: { type: 'boolean' }, help: { type: 'boolean', short: 'h' } },
      strict: true,
      allowPositionals,
    });
    const all = values as Record<string, string | boolean | undefined>;
    const strings: Record<string, string | undefined> = {};
    for (const key of Object.keys(options)) strings[key] = all[key] as string | undefined;
    return { values: strings, positionals, json: values.json === true, help: values.help === true };
  } catch (err) {
    throw new UsageError(err instanceof Error ? err.message : String(err));
  }
}

/** The number given for --name, or undefined when absent; a UsageError naming the flag when not a number. */
export function numberOption(parsed: ParsedOptions, name: string): number | undefined {
  const text = parsed.values[name];
  if (text === undefined) return undefined;
  const t = text.trim().replace(/^−/, '-');
  if (!NUMBER_TEXT.test(t)) throw new UsageError(`--${name} "${text}" is not a number`, `--${name}`);
  return Number(t);
}

/** Like numberOption but the option must be present. */
export function requiredNumber(parsed: ParsedOptions, name: string): number {
  const value = numberOption(parsed, name);
  if (value === undefined) throw new UsageError(`--${name} is required`, `--${name}`);
  return value;
}

/** Usage text: the synopsis and one line per option. */
export function usageText(synopsis: string, options: OptionHelp): string {
  const width = Math.max(6, ...Object.keys(options).map((k) => k.length)) + 2;
  return [
    `usage: npm run --silent cli -- ${synopsis}`,
    '',
    ...Object.entries(options).map(([k, d]) => `  --${k.padEnd(width)} ${d}`),
    `  --${'json'.padEnd(width)} print one JSON object`,
    '',
    'Negative numbers may follow the option directly: --opt -5 or --opt=-5.',
  ].join('\n');
}

/** A readable table: label, value, unit (aligned), under a title. */
export function formatTable(title: string, rows: [label: string, value: string, unit?: string][], footer: string[] = []): string {
  const lw = Math.max(...rows.map(([l]) => l.length));
  const vw = Math.max(...rows.map(([, v]) => v.length));
  const lines = [title, '', ...rows.map(([l, v, u]) => `  ${l.padEnd(lw)}  ${v.padStart(vw)}${u ? ` ${u}` : ''}`)];
  if (footer.length) lines.push('', ...footer);
  return lines.join('\n');
}

/** Number text for tables: fixed for moderate magnitudes, exponent otherwise. */
export function formatNumber(x: number, digits = 5): string {
  if (x === 0) return '0';
  const a = Math.abs(x);
  if (a >= 1e-3 && a < 1e5) return x.toPrecision(digits);
  return x.toExponential(digits - 1);
}

/**
 * Maps a library PhysicsError to the command-line flag the user typed: `flags` is
 * library input name → option name (without --).
 */
export function asUsageError(err: unknown, flags: Record<string, string>): UsageError | null {
  if (err instanceof UsageError) return err;
  if (err instanceof PhysicsError) {
    const flag = flags[err.input];
    return new UsageError(flag ? `--${flag}: ${err.message}` : err.message, flag ? `--${flag}` : undefined);
  }
  return null;
}

/** The text of a usage error and where it goes: JSON on stdout with --json, else stderr with the usage. */
export function usageErrorOutput(err: UsageError, json: boolean, usage: string): { stream: 'stdout' | 'stderr'; text: string } {
  if (json) {
    return { stream: 'stdout', text: `${JSON.stringify({ error: err.message, ...(err.option ? { option: err.option } : {}) })}\n` };
  }
  return { stream: 'stderr', text: `error: ${err.message}\n\n${usage}\n` };
}

/**
 * The frame every command shares: parse the options, answer --help, run `body`, and turn a
 * usage error (bad or missing option, out-of-range input) into exit status 2 with a message —
 * JSON on stdout with --json, text on stderr otherwise. Anything else propagates.
 */
export async function runCommand(
  argv: string[],
  cmd: { options: OptionHelp; usage: string; flags: Record<string, string>; allowPositionals?: boolean },
  body: (parsed: ParsedOptions) => number | Promise<number>,
): Promise<number> {
  const json = argv.includes('--json');
  try {
    const parsed = parseOptions(argv, cmd.options, cmd.allowPositionals ?? false);
    if (parsed.help) {
      process.stdout.write(`${cmd.usage}\n`);
      return 0;
    }
    return await body(parsed);
  } catch (err) {
    const usage = asUsageError(err, cmd.flags);
    if (!usage) throw err;
    const out = usageErrorOutput(usage, json, cmd.usage);
    process[out.stream].write(out.text);
    return 2;
  }
}
