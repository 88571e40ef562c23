import { run as fermi } from '@/cli/commands/fermi';
import { run as ni } from '@/cli/commands/ni';
import { run as split } from '@/cli/commands/split';
import { run as translate } from '@/cli/commands/translate';
import { KB_EV_PER_K } from '@/lib/physics/constants';
import { runCli } from '@/tests/cli/built-cli';
import { REFERENCE_MODULE, referencePath } from '@/tests/support/reference-data';

type Run = (argv: string[]) => Promise<number>;

async function capture(run: Run, argv: string[]): Promise<{ code: number; out: string; err: string }> {
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

const MODULE_CSV = referencePath(REFERENCE_MODULE);

describe('ni command', () => {
  it('prints exactly {ni_cm3, eg_ev, nc_cm3, nv_cm3}; n_i(300 K) within 2 % of 9.65e9 (Altermatt et al. 2003)', async () => {
    const { code, out } = await capture(ni, ['--temp-k', '300', '--json']);
    expect(code).toBe(0);
    const j = JSON.parse(out);
    expect(Object.keys(j).sort()).toEqual(['eg_ev', 'nc_cm3', 'ni_cm3', 'nv_cm3']);
    expect(Math.abs(j.ni_cm3 / 9.65e9 - 1)).toBeLessThan(0.02);
    // Green (1990): Nc(300 K) = 2.86e19 cm⁻³ (memory); Eg(300 K) ≈ 1.1242 eV (memory).
    expect(j.nc_cm3).toBeCloseTo(2.86e19, -14);
    expect(Math.abs(j.eg_ev - 1.1242)).toBeLessThan(0.001);
  });

  it('prints a table with units and sources', async () => {
    const { code, out } = await capture(ni, ['--temp-k', '300']);
    expect(code).toBe(0);
    expect(out).toMatch(/Intrinsic density n_i\s+9\.68\d*e\+9 cm⁻³/);
    expect(out).toMatch(/Band gap Eg\s+1\.12\d+ eV/);
    expect(out).toMatch(/Altermatt/);
  });

  it.each([['-5'], ['0'], ['1e6']])('--temp-k %s exits 2 with an error naming --temp-k', async (t) => {
    const { code, err } = await capture(ni, ['--temp-k', t]);
    expect(code).toBe(2);
    expect(err).toMatch(/--temp-k/);
  });

  it('a missing or non-numeric --temp-k is a usage error (JSON on stdout with --json)', async () => {
    const missing = await capture(ni, ['--json']);
    expect(missing.code).toBe(2);
    expect(JSON.parse(missing.out)).toEqual({ error: '--temp-k is required', option: '--temp-k' });
    const bad = await capture(ni, ['--temp-k', 'warm']);
    expect(bad.code).toBe(2);
    expect(bad.err).toMatch(/--temp-k "warm" is not a number/);
  });
});

describe('fermi command', () => {
  // Reference README table: F½(0) = 0.765147024625, F½(−5) = 0.00672195431451 (polylogarithm).
  it.each([
    ['0', 0.765147024625, 1],
    ['-5', 0.00672195431451, Math.exp(-5)],
  ])('--eta %s prints exactly {f_half, boltzmann} matching the reference table', async (eta, fHalf, boltzmann) => {
    const { code, out } = await capture(fermi, ['--eta', eta, '--json']);
    expect(code).toBe(0);
    const j = JSON.parse(out);
    expect(Object.keys(j).sort()).toEqual(['boltzmann', 'f_half']);
    expect(Math.abs(j.f_half / fHalf - 1)).toBeLessThan(1e-10);
    expect(j.boltzmann).toBeCloseTo(boltzmann, 14);
  });

  it('shows the Boltzmann error in the table', async () => {
    const { out } = await capture(fermi, ['--eta', '5']);
    expect(out).toMatch(/Boltzmann error\s+[\d.]+ %/);
  });

  it.each([['-41'], ['100.5']])('--eta %s is outside the supported range and exits 2 naming --eta', async (eta) => {
    const { code, out } = await capture(fermi, ['--eta', eta, '--json']);
    expect(code).toBe(2);
    expect(JSON.parse(out).option).toBe('--eta');
  });
});

describe('split command', () => {
  const args = ['--doping-cm3', '1e16', '--type', 'p', '--excess-cm3', '1e15', '--temp-k', '300'];

  // Boltzmann closed form (DOMAIN.md), non-degenerate case: splitting = k_BT·ln((n0+Δ)(p0+Δ)/n_i²)
  // with n_i from the ni command; E_Fn = k_BT·ln(n/n_i), E_Fp = −k_BT·ln(p/n_i) from E_i.
  it('prints exactly {splitting_ev, implied_voc_v, efn_ev, efp_ev}, matching the Boltzmann closed form within 1e-5 eV', async () => {
    const { code, out } = await capture(split, [...args, '--json']);
    expect(code).toBe(0);
    const j = JSON.parse(out);
    expect(Object.keys(j).sort()).toEqual(['efn_ev', 'efp_ev', 'implied_voc_v', 'splitting_ev']);
    const niJson = JSON.parse((await capture(ni, ['--temp-k', '300', '--json'])).out);
    const kT = KB_EV_PER_K * 300;
    const nI = niJson.ni_cm3;
    const n = nI ** 2 / 1e16 + 1e15;
    const p = 1e16 + 1e15;
    expect(Math.abs(j.splitting_ev - kT * Math.log((n * p) / nI ** 2))).toBeLessThan(1e-5);
    expect(Math.abs(j.efn_ev - kT * Math.log(n / nI))).toBeLessThan(1e-5);
    expect(Math.abs(j.efp_ev - -kT * Math.log(p / nI))).toBeLessThan(1e-5);
    expect(j.implied_voc_v).toBe(j.splitting_ev);
  });

  it('accepts a generation rate and lifetime instead of the excess density', async () => {
    const a = JSON.parse((await capture(split, [...args, '--json'])).out);
    const b = JSON.parse(
      (await capture(split, ['--doping-cm3', '1e16', '--type', 'p', '--generation-cm3s', '1e19', '--lifetime-s', '1e-4', '--temp-k', '300', '--json'])).out,
    );
    expect(b.splitting_ev).toBeCloseTo(a.splitting_ev, 12);
  });

  it('prints both statistics in a table with units', async () => {
    const { out } = await capture(split, ['--doping-cm3', '1e20', '--type', 'n', '--excess-cm3', '1e17', '--temp-k', '300']);
    expect(out).toMatch(/Implied Voc \(Fermi–Dirac\)\s+[\d.]+ V/);
    expect(out).toMatch(/Implied Voc \(Boltzmann\)\s+[\d.]+ V/);
    expect(out).toMatch(/Degenerate/);
  });

  it.each([
    [['--doping-cm3', '-1e16', '--type', 'p', '--excess-cm3', '1e15', '--temp-k', '300'], '--doping-cm3'],
    [['--doping-cm3', '5e21', '--type', 'p', '--excess-cm3', '1e15', '--temp-k', '300'], '--doping-cm3'],
    [['--doping-cm3', '1e16', '--type', 'q', '--excess-cm3', '1e15', '--temp-k', '300'], '--type'],
    [['--doping-cm3', '1e16', '--type', 'p', '--excess-cm3', '-1', '--temp-k', '300'], '--excess-cm3'],
    [['--doping-cm3', '1e16', '--type', 'p', '--excess-cm3', '1e15', '--temp-k', '0'], '--temp-k'],
  ])('%j exits 2 naming %s', async (argv, option) => {
    const { code, out } = await capture(split, [...argv, '--json']);
    expect(code).toBe(2);
    expect(JSON.parse(out).option).toBe(option);
  });
});

describe('translate command', () => {
  const base = [MODULE_CSV, '--from-irradiance-wm2', '1000', '--from-temp-c', '45', '--to-irradiance-wm2', '1000', '--to-temp-c', '25'];
  const proc1 = ['--method', 'iec60891-1', '--alpha-a-per-k', '0.0005', '--beta-v-per-k', '-0.08', '--rs-ohm', '1.2', '--kappa-ohm-per-k', '0'];

  // Procedure 1 moves every point by ΔV = −Rs·ΔI + β·ΔT with ΔI = α·ΔT here (G unchanged):
  // ΔI = 0.0005·(−20) = −0.01 A; ΔV = −1.2·(−0.01) + (−0.08)(−20) = 0.012 + 1.6 = 1.612 V (hand).
  // The new Voc is the old point that carried +0.01 A, which sits 0.01 A·Rs0 below the old Voc
  // (Rs0 = −dV/dI at Voc of the measured curve): Voc2 − Voc1 = 1.612 − 0.01·Rs0.
  it('IEC 60891-1 on the reference module: JSON with translated key figures and curve; Voc moves by 1.612 V − 0.01 A·Rs0 (hand arithmetic)', async () => {
    const { code, out } = await capture(translate, [...base, ...proc1, '--json']);
    expect(code).toBe(0);
    const j = JSON.parse(out);
    expect(j.method).toBe('iec60891-1');
    expect(j.curve.voltage_v.length).toBe(j.curve.current_a.length);
    const expectedShift = 1.612 - 0.01 * j.measured_key_figures.rs0_ohm;
    expect(Math.abs(j.key_figures.voc_v - j.measured_key_figures.voc_v - expectedShift)).toBeLessThan(1e-3);
    expect(j.key_figures.isc_a).toBeGreaterThan(0);
    expect(j.to).toEqual({ irradiance_wm2: 1000, temp_c: 25 });
  });

  // The lib/iv fit of this curve should land on the README's true-current optimum
  // (Iph 1.031434 A, n 1.32217, Rs 1.235634 Ω, Rsh 821.64 Ω); at the same irradiance Rs, Rsh and n
  // are kept and Iph moves by α·ΔT = 0.0005·1.031434·(−20) = −0.0103143 A (De Soto 2006).
  it('model method fits the curve and scales the parameters (De Soto)', async () => {
    const { code, out } = await capture(translate, [...base, '--method', 'model', '--cells', '36', '--json']);
    expect(code).toBe(0);
    const j = JSON.parse(out);
    expect(j.params.n).toBeCloseTo(1.32217, 3);
    expect(j.params.rsh_ohm).toBeCloseTo(821.64, -1);
    expect(j.params.iph_a).toBeCloseTo(1.031434 - 0.0103143, 3);
    expect(j.model_figures.voc_v).toBeGreaterThan(j.measured_key_figures.voc_v);
  });

  it('prints measured and translated figures side by side with units', async () => {
    const { code, out } = await capture(translate, [...base, ...proc1]);
    expect(code).toBe(0);
    expect(out).toMatch(/measured\s+translated/);
    expect(out).toMatch(/Voc\s+16\.\d+\s+18\.\d+ V/);
  });

  it.each(['alpha-a-per-k', 'beta-v-per-k', 'rs-ohm', 'kappa-ohm-per-k'])('a missing --%s exits 2 naming the coefficient', async (flag) => {
    const argv = [...base, ...proc1];
    const at = argv.indexOf(`--${flag}`);
    argv.splice(at, 2);
    const { code, out } = await capture(translate, [...argv, '--json']);
    expect(code).toBe(2);
    const j = JSON.parse(out);
    expect(j.option).toBe(`--${flag}`);
    expect(j.error).toMatch(/coefficient/);
  });

  it('procedure 2 without the irradiance factor names --a-irradiance', async () => {
    const { code, err } = await capture(translate, [
      ...base,
      '--method',
      'iec60891-2',
      '--alpha-rel-per-k',
      '0.0005',
      '--beta-rel-per-k',
      '-0.004',
      '--rs-ohm',
      '1.2',
      '--kappa-ohm-per-k',
      '0',
    ]);
    expect(code).toBe(2);
    expect(err).toMatch(/--a-irradiance/);
  });

  it.each([
    [['--method', 'guess'], '--method'],
    [['--method', 'model'], '--cells'],
  ])('%j exits 2 naming %s', async (extra, option) => {
    const { code, out } = await capture(translate, [...base, ...extra, '--json']);
    expect(code).toBe(2);
    expect(JSON.parse(out).option).toBe(option);
  });

  it('an unreadable file and a missing measurement temperature are usage errors', async () => {
    const missing = await capture(translate, ['/no/such/file.csv', '--to-irradiance-wm2', '1000', '--to-temp-c', '25', ...proc1, '--json']);
    expect(missing.code).toBe(2);
    expect(JSON.parse(missing.out).error).toMatch(/cannot read/);
    const noTemp = await capture(translate, [MODULE_CSV, '--from-irradiance-wm2', '1000', '--to-irradiance-wm2', '1000', '--to-temp-c', '25', ...proc1, '--json']);
    expect(JSON.parse(noTemp.out).option).toBe('--from-temp-c');
  });
});

describe('through the real command line', () => {
  it('npm run cli -- ni --temp-k 300 --json prints the four keys (the built CLI)', () => {
    const r = runCli(['ni', '--temp-k', '300', '--json']);
    expect(r.status).toBe(0);
    expect(Object.keys(JSON.parse(r.stdout)).sort()).toEqual(['eg_ev', 'nc_cm3', 'ni_cm3', 'nv_cm3']);
  });
});
