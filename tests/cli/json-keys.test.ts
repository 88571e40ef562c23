/**
 * One vocabulary for the command line: every key of every command's --json output is snake_case
 * (tests/support/json-keys.ts), on the reference files of tests/fixtures/reference-data. The commands
 * run in-process (stdout captured), the way the other CLI tests run them.
 */
import path from 'node:path';
import { run as fermi } from '@/cli/commands/fermi';
import { run as fit } from '@/cli/commands/fit';
import { run as ni } from '@/cli/commands/ni';
import { run as split } from '@/cli/commands/split';
import { run as strings } from '@/cli/commands/strings';
import { run as translate } from '@/cli/commands/translate';
import { nonSnakeKeys } from '@/tests/support/json-keys';
import { REFERENCE_DATA_DIR } from '@/tests/support/reference-data';

type Run = (argv: string[]) => Promise<number>;

const REF_DIR = REFERENCE_DATA_DIR;
const MODULE_CSV = path.join(REF_DIR, 'module-36cell-45C.csv');
const CELL_CSV = path.join(REF_DIR, 'cell-57mm-33C.csv');

async function jsonOf(run: Run, argv: string[]): Promise<unknown[]> {
  let out = '';
  const o = jest.spyOn(process.stdout, 'write').mockImplementation((chunk) => ((out += String(chunk)), true));
  const e = jest.spyOn(process.stderr, 'write').mockImplementation(() => true);
  // fit prints through console.log, the others write to stdout.
  const l = jest.spyOn(console, 'log').mockImplementation((...a: unknown[]) => void (out += a.map(String).join(' ') + '\n'));
  const ce = jest.spyOn(console, 'error').mockImplementation(() => undefined);
  try {
    await run(argv);
  } finally {
    o.mockRestore();
    e.mockRestore();
    l.mockRestore();
    ce.mockRestore();
  }
  // One JSON document, or one per line (fit prints a line per file).
  const text = out.trim();
  try {
    return [JSON.parse(text)];
  } catch {
    return text.split('\n').filter(Boolean).map((l) => JSON.parse(l));
  }
}

const translateBase = [MODULE_CSV, '--from-irradiance-wm2', '1000', '--from-temp-c', '45', '--to-irradiance-wm2', '800', '--to-temp-c', '25'];

describe('every key of the CLI JSON is snake_case', () => {
  jest.setTimeout(60_000);
  it.each([
    ['fermi', fermi, ['--eta', '2', '--json']],
    ['ni', ni, ['--temp-k', '300', '--json']],
    ['split', split, ['--doping-cm3', '1e16', '--type', 'p', '--excess-cm3', '1e15', '--temp-k', '300', '--json']],
    ['strings (with the MPP window)', strings, ['--voc-v', '49.5', '--beta-pct-per-k', '-0.28', '--tmin-c', '-10', '--vsys-v', '1500', '--vmp-v', '41.5', '--beta-vmp-pct-per-k', '-0.37', '--tcell-max-c', '70', '--mpp-min-v', '500', '--mpp-max-v', '1300', '--json']],
    ['translate (IEC 60891-1)', translate, [...translateBase, '--method', 'iec60891-1', '--alpha-a-per-k', '0.0005', '--beta-v-per-k', '-0.08', '--rs-ohm', '1.2', '--kappa-ohm-per-k', '0', '--json']],
    ['translate (model)', translate, [...translateBase, '--method', 'model', '--cells', '36', '--json']],
    ['fit', fit, [CELL_CSV, '--temp-c', '33', '--cells', '1', '--json']],
  ] as [string, Run, string[]][])('%s', async (_name, run, argv) => {
    const docs = await jsonOf(run, argv);
    expect(docs.length).toBeGreaterThan(0);
    for (const d of docs) expect(nonSnakeKeys(d)).toEqual([]);
  });

  it('an error answer is snake_case too', async () => {
    const docs = await jsonOf(translate, ['/no/such/file.csv', '--to-irradiance-wm2', '1000', '--to-temp-c', '25', '--json']);
    for (const d of docs) expect(nonSnakeKeys(d)).toEqual([]);
  });
});
