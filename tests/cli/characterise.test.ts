/**
 * `characterise FILE... --json` on files of the invented module of
 * tests/lib/analysis/characterise/synthetic.ts (metadata lines with units the reader converts
 * through mathjs: kW/m², K, mV), run in-process; and a set that cannot be characterised.
 */
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { run } from '@/cli/commands/characterise';
import { nonSnakeKeys } from '@/tests/support/json-keys';
import { MODULE, synthCurve, truthPmax } from '@/tests/lib/analysis/characterise/synthetic';

jest.setTimeout(120_000);

let dir: string;
const files: string[] = [];

function write(g: number, t: number, name = `m-${g}-${t}.csv`, device = 'INV-1'): string {
  const c = synthCurve(g, t);
  const lines = [`Device ID,${device}`, `Irradiance,${g / 1000},kW/m2`, `Cell temperature,${(t + 273.15).toFixed(2)},K`, `Cells,${MODULE.cells}`, 'Voltage (mV),Current (A)'];
  c.voltage_v.forEach((v, k) => lines.push(`${(v * 1000).toFixed(3)},${c.current_a[k].toFixed(6)}`));
  const file = path.join(dir, name);
  writeFileSync(file, lines.join('\n'));
  return file;
}

async function capture(argv: string[]): Promise<{ code: number; out: string; err: string }> {
  let out = '';
  let err = '';
  const o = jest.spyOn(process.stdout, 'write').mockImplementation((c) => ((out += String(c)), true));
  const e = jest.spyOn(process.stderr, 'write').mockImplementation((c) => ((err += String(c)), true));
  try {
    return { code: await run(argv), out, err };
  } finally {
    o.mockRestore();
    e.mockRestore();
  }
}

beforeAll(() => {
  dir = mkdtempSync(path.join(os.tmpdir(), 'charz-'));
  for (const t of [15, 25, 50, 75]) files.push(write(1000, t));
  for (const g of [200, 400, 600, 800]) files.push(write(g, 25));
});
afterAll(() => rmSync(dir, { recursive: true, force: true }));

it('prints one JSON object with the coefficients, IEC 60891 parameters, matrix and STC figures', async () => {
  const r = await capture([...files, '--json']);
  expect(r.code).toBe(0);
  const doc = JSON.parse(r.out);
  expect(nonSnakeKeys(doc)).toEqual([]);
  expect(doc.device).toBe('INV-1');
  expect(doc.curves).toBe(8);
  expect(doc.alpha_isc_pct_per_k).toBeCloseTo(MODULE.alpha_rel_per_k * 100, 3);
  expect(doc.stderr.beta_voc_pct_per_k).toBeGreaterThan(0);
  expect(doc.iec60891.procedure1.rs_ohm).toBeGreaterThan(0.3);
  expect(doc.iec60891.procedure1.rs_ohm).toBeLessThan(0.4);
  expect(typeof doc.iec60891.procedure2.a_irradiance).toBe('number');
  expect(doc.stc.pmp_w).toBeCloseTo(truthPmax(1000, 25), 0);
  for (const c of doc.matrix) {
    expect(Object.keys(c)).toEqual(expect.arrayContaining(['irradiance_wm2', 'temp_c', 'pmp_w', 'voc_v', 'isc_a', 'ff_pct', 'source']));
    expect(Math.abs(c.pmp_w / truthPmax(c.irradiance_wm2, c.temp_c) - 1)).toBeLessThan(0.01);
  }
});

it('takes files without a device line as one device', async () => {
  const plain = [[1000, 15], [1000, 25], [1000, 50], [1000, 75]].map(([g, t]) => {
    const c = synthCurve(g, t);
    const file = path.join(dir, `plain-${g}-${t}.txt`);
    writeFileSync(file, [`Irradiance: ${g} W/m2`, `Temperature: ${t} C`, 'V,I', ...c.voltage_v.map((v, k) => `${v},${c.current_a[k]}`)].join('\n'));
    return file;
  });
  const r = await capture([...plain, '--json']);
  expect(r.code).toBe(0);
  const doc = JSON.parse(r.out);
  expect(doc.device).toBeNull();
  expect(doc.beta_voc_pct_per_k).toBeLessThan(-0.2);
});

it('answers a set that cannot be characterised with {error} and exit 2', async () => {
  const r = await capture([files[0], files[4], files[5], '--json']);
  expect(r.code).toBe(2);
  expect(JSON.parse(r.out)).toEqual({ error: expect.stringMatching(/at least 3 curves at 3 different cell temperatures/) });
  const other = write(1000, 40, 'other.csv', 'INV-2');
  const two = await capture([...files, other, '--json']);
  expect(two.code).toBe(2);
  expect(JSON.parse(two.out).error).toMatch(/2 devices/);
});
