import { run } from '@/cli/commands/strings';
import { runCli } from '@/tests/cli/built-cli';

async function capture(argv: string[]): Promise<{ code: number; out: string; err: string }> {
  let out = '';
  let err = '';
  const o = jest.spyOn(process.stdout, 'write').mockImplementation((chunk) => ((out += String(chunk)), true));
  const e = jest.spyOn(process.stderr, 'write').mockImplementation((chunk) => ((err += String(chunk)), true));
  try {
    const code = await run(argv);
    return { code, out, err };
  } finally {
    o.mockRestore();
    e.mockRestore();
  }
}

const EXAMPLE = ['--voc-v', '49.5', '--beta-pct-per-k', '-0.28', '--tmin-c', '-10', '--vsys-v', '1500'];

describe('strings command', () => {
  it('prints the four figures as JSON (hand example: 54.351 V, 27 modules, 1467.477 V, 32.523 V)', async () => {
    // 49.5 × (1 + 0.0028 × 35) = 54.351; ⌊1500/54.351⌋ = 27; 27 × 54.351 = 1467.477; 1500 − 1467.477 = 32.523
    const { code, out } = await capture([...EXAMPLE, '--json']);
    expect(code).toBe(0);
    const j = JSON.parse(out);
    expect(j.voc_max_per_module_v).toBeCloseTo(54.351, 6);
    expect(j.max_modules).toBe(27);
    expect(j.string_voc_max_v).toBeCloseTo(1467.477, 6);
    expect(j.margin_v).toBeCloseTo(32.523, 6);
    expect(j.warnings).toEqual([]);
    expect(j.caution).toMatch(/guidance/);
  });

  it('accepts "--opt=-10" as well as "--opt -10"', async () => {
    const a = await capture(['--voc-v=49.5', '--beta-pct-per-k=-0.28', '--tmin-c=-10', '--vsys-v=1500', '--json']);
    expect(JSON.parse(a.out).max_modules).toBe(27);
  });

  it('adds the MPP side when asked', async () => {
    const { out } = await capture([...EXAMPLE, '--json', '--vmp-v', '41.5', '--beta-vmp-pct-per-k', '-0.37', '--tcell-max-c', '70', '--mpp-min-v', '500', '--mpp-max-v', '1300']);
    const j = JSON.parse(out);
    expect(j.min_modules).toBe(15); // ⌈500 / 34.59025⌉, see the library test
    expect(j.fits).toBe(true);
  });

  it('prints a table with the caution without --json', async () => {
    const { code, out } = await capture(EXAMPLE);
    expect(code).toBe(0);
    expect(out).toMatch(/Most modules in series\s+27/);
    expect(out).toMatch(/String Voc at -10 °C\s+1467\.48 V {2}⚠ above 60 V DC/);
    expect(out).toContain('High voltage');
    expect(out).toMatch(/design guidance only/);
  });

  it.each([
    [['--voc-v', '49.5', '--json'], /missing --beta-pct-per-k, --tmin-c, --vsys-v/],
    [[...EXAMPLE.slice(0, 6), '--vsys-v', '40', '--json'], /below one module's cold-weather Voc/],
    [['--voc-v', 'abc', ...EXAMPLE.slice(2), '--json'], /--voc-v "abc" is not a number/],
    [[...EXAMPLE.slice(0, 4), '--tmin-c', '-75', '--vsys-v', '1500', '--json'], /outside -60…\+100 °C/],
    [[...EXAMPLE, '--volts', '3', '--json'], /Unknown option '--volts'/],
    [[...EXAMPLE, '--mpp-min-v', '500', '--json'], /give both --mpp-min-v and --mpp-max-v/],
  ])('bad input %j → {"error"} and exit 2', async (argv, message) => {
    const { code, out } = await capture(argv);
    expect(code).toBe(2);
    const j = JSON.parse(out);
    expect(Object.keys(j)).toEqual(['error']);
    expect(j.error).toMatch(message);
  });

  it('bad input without --json goes to stderr with the usage', async () => {
    const { code, out, err } = await capture(['--voc-v', '49.5']);
    expect(code).toBe(2);
    expect(out).toBe('');
    expect(err).toMatch(/^error: missing/);
    expect(err).toMatch(/usage:/);
  });

  it('works end to end through the built command line', () => {
    const r = runCli(['strings', ...EXAMPLE, '--json']);
    expect(r.status).toBe(0);
    expect(JSON.parse(r.stdout).max_modules).toBe(27);
  });
});
