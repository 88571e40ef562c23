import { mkdtempSync, writeFileSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { runCli } from '@/tests/cli/built-cli';
import { REFERENCE_DATA_DIR } from '@/tests/support/reference-data';

// The built command line (build/cli.cjs through cli/launch.cjs), as `npm run cli` starts it.
const REF_DIR = REFERENCE_DATA_DIR;

const cli = (args: string[]) => runCli(['fit', ...args]);

describe('cli fit', () => {
  jest.setTimeout(60_000);

  it('cell file and a bad file: one JSON line each, exit status 2 after processing both', () => {
    const dir = mkdtempSync(path.join(os.tmpdir(), 'ql-fit-'));
    const bad = path.join(dir, 'bad.csv');
    writeFileSync(bad, 'V,I\n0,0.76\n0.1,abc\n');
    const cellFile = path.join(REF_DIR, 'cell-57mm-33C.csv');
    const r = cli([cellFile, bad, '--temp-c', '33', '--cells', '1', '--json']);
    expect(r.status).toBe(2);
    expect(r.lines).toHaveLength(2);
    const cell = JSON.parse(r.lines[0]);
    expect(cell.file).toBe(cellFile);
    expect(Object.keys(cell.metrics)).toEqual(expect.arrayContaining(['isc_a', 'voc_v', 'pmp_w', 'imp_a', 'vmp_v', 'ff', 'efficiency']));
    expect(cell.metrics.efficiency).toBeNull();
    expect(cell.fit).toEqual(
      expect.objectContaining({ model: 'single-diode', converged: true, stderr: expect.objectContaining({ n: expect.any(Number), rs_ohm: expect.any(Number) }) }),
    );
    for (const key of ['iph_a', 'i0_a', 'n', 'rs_ohm', 'rsh_ohm', 'rmse_a', 'evaluations', 'elapsed_ms']) expect(typeof cell.fit[key]).toBe('number');
    // Published optimum 7.7301e-4 A (reference-data README), within 0.1 %.
    expect(Math.abs(cell.fit.rmse_a / 7.7301e-4 - 1)).toBeLessThan(1e-3);
    expect(Array.isArray(cell.flags)).toBe(true);

    const err = JSON.parse(r.lines[1]);
    expect(err.file).toBe(bad);
    expect(err.error).toMatch(/^line 3: the current value "abc" is not a number/);
    expect(err.code).toBe('not-a-number');
    expect(err.line).toBe(3);
    expect(err.metrics).toBeUndefined();
  });

  it('module file with implicit objective and efficiency: exit status 0', () => {
    const r = cli([path.join(REF_DIR, 'module-36cell-45C.csv'), '--temp-c', '45', '--cells', '36', '--objective', 'implicit', '--area-cm2', '1000', '--irradiance-wm2', '1000', '--json']);
    expect(r.status).toBe(0);
    const out = JSON.parse(r.lines[0]);
    // Widely published implicit-residual optimum 2.4251e-3 A (reference-data README), within 0.1 %.
    expect(out.fit.objective).toBe('implicit');
    expect(Math.abs(out.fit.rmse_a / 2.4251e-3 - 1)).toBeLessThan(1e-3);
    // efficiency = Pmp / (1000 W/m² · 0.1 m²) (definition)
    expect(out.metrics.efficiency).toBeCloseTo(out.metrics.pmp_w / 100, 10);
    expect(out.flags.map((f: { code: string }) => f.code)).toContain('isc-extrapolated');
  });

  it('double diode as a readable table; a bad option is a usage error', () => {
    const r = cli([path.join(REF_DIR, 'cell-57mm-33C.csv'), '--temp-c', '33', '--model', 'double', '--idealities', 'free']);
    expect(r.status).toBe(0);
    expect(r.stdout).toMatch(/double-diode fit \(true current\): converged/);
    expect(r.stdout).toMatch(/RMSE 0\.00074194 A/); // README: 7.4194e-4 A for these bounds
    const bad = cli(['--model', 'triple', 'x.csv']);
    expect(bad.status).toBe(2);
    expect(bad.stderr).toMatch(/--model must be single or double/);
  });
});
