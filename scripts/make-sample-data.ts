/**
 * Writes the demo batches under sample-data/batches/ (committed; the seed loads them).
 * Invented devices of the invented Kestrel Flats Module Works, simulated with the single-diode
 * model from parameters chosen here, with measurement noise and a few deliberate defects:
 * a shunted cell, a high-Rs module and a module whose shaded substring makes its bypass
 * diode conduct (a step in the curve). Run: npx tsx scripts/make-sample-data.ts
 */
import { mkdirSync, rmSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { gaussian, seededRandom, singleDiodeCurrent, singleDiodeVoltage } from '@/lib/iv';
import type { SingleDiodeParams } from '@/lib/iv';

const OUT = path.resolve(__dirname, '..', 'sample-data', 'batches');

type Device = { id: string; params: SingleDiodeParams; temp_c: number; shadedSubstring?: number };
type BatchSpec = {
  slug: string;
  name: string;
  product_type: string;
  supplier: string;
  line: string;
  lot: string;
  batch_date: string;
  cells: number;
  area_cm2: number;
  nameplate_w: number | null;
  /** The module type's coefficients for the STC figures (lib/analysis/stc.ts): typical crystalline-silicon values (common practice), invented for the demo. */
  irradiance_w_m2: number | null;
  alpha_pct_per_k: number | null;
  beta_pct_per_k: number | null;
  gamma_pct_per_k: number | null;
  rs_ohm: number | null;
  kappa_ohm_per_k: number | null;
  description: string;
  devices: Device[];
};

const rnd = seededRandom(20261114);
const normal = gaussian(seededRandom(7));
const jitter = (x: number, rel: number) => x * (1 + rel * normal());

function cells(): BatchSpec {
  const devices: Device[] = [];
  for (let k = 1; k <= 30; k++) {
    const p: SingleDiodeParams = { iph_a: jitter(13.86, 0.006), i0_a: jitter(1.3e-10, 0.12), n: jitter(1.05, 0.01), rs_ohm: jitter(0.0016, 0.06), rsh_ohm: jitter(320, 0.15) };
    if (k === 17) p.rsh_ohm = 0.9; // shunted cell: edge leakage or a crack
    devices.push({ id: `KF-C24-${String(k).padStart(4, '0')}`, params: p, temp_c: Number((25 + 0.6 * normal()).toFixed(1)) });
  }
  return {
    slug: 'kf-c24-cells',
    name: 'KF-C24 incoming cells, lot A-1187',
    product_type: 'M10 mono PERC cell',
    supplier: 'Aster Wafer (invented)',
    line: 'cell incoming',
    lot: 'A-1187',
    batch_date: '2026-11-12',
    cells: 1,
    area_cm2: 330.2,
    nameplate_w: null,
    irradiance_w_m2: null,
    alpha_pct_per_k: 0.05,
    beta_pct_per_k: -0.27,
    gamma_pct_per_k: -0.35,
    rs_ohm: null,
    kappa_ohm_per_k: null,
    description: 'Incoming inspection of purchased cells before stringing. Demo data: invented devices.',
    devices,
  };
}

function modules(slug: string, name: string, line: string, lot: string, date: string, supplier: string, rs: number, iph: number, defects: boolean): BatchSpec {
  const devices: Device[] = [];
  for (let k = 1; k <= 24; k++) {
    const p: SingleDiodeParams = { iph_a: jitter(iph, 0.005), i0_a: jitter(2.2e-10, 0.12), n: jitter(1.08, 0.01), rs_ohm: jitter(rs, 0.05), rsh_ohm: jitter(450, 0.2) };
    const d: Device = { id: `${lot}-${String(k).padStart(3, '0')}`, params: p, temp_c: Number((25 + 1.0 * normal()).toFixed(1)) };
    if (defects && k === 9) p.rs_ohm = rs * 3.2; // high series resistance: a failed solder joint
    if (defects && k === 15) d.shadedSubstring = 0.72; // one substring at 72 % current: bypass diode conducts
    devices.push(d);
  }
  return {
    slug,
    name,
    product_type: '60-cell mono PERC module',
    supplier,
    line,
    lot,
    batch_date: date,
    cells: 60,
    area_cm2: 16610,
    nameplate_w: 330,
    irradiance_w_m2: null,
    alpha_pct_per_k: 0.05,
    beta_pct_per_k: -0.29,
    gamma_pct_per_k: -0.37,
    rs_ohm: 0.35,
    kappa_ohm_per_k: null,
    description: `End-of-line flash test, ${line}. Demo data: invented devices.`,
    devices,
  };
}

/** Current-voltage samples of one device; a shaded substring is modelled with its bypass diode. */
function curveOf(d: Device, cellsInSeries: number, points: number): { v: number[]; i: number[] } {
  const p = d.params;
  const voc = singleDiodeVoltage(p, 0, cellsInSeries, d.temp_c);
  const v: number[] = [];
  const i: number[] = [];
  const noise = 0.0012 * p.iph_a;
  if (!d.shadedSubstring) {
    for (let k = 0; k < points; k++) {
      const x = -0.02 * voc + (1.04 * voc * k) / (points - 1);
      v.push(x);
      i.push(singleDiodeCurrent(p, x, cellsInSeries, d.temp_c) + noise * normal());
    }
    return { v, i };
  }
  // Three substrings of 20 cells; one sees less light. For a current I the module voltage is the
  // sum of the substring voltages, a substring that cannot carry I being bypassed at −0.45 V.
  const sub = cellsInSeries / 3;
  const shaded: SingleDiodeParams = { ...p, iph_a: p.iph_a * d.shadedSubstring, rs_ohm: p.rs_ohm / 3 };
  const lit: SingleDiodeParams = { ...p, rs_ohm: p.rs_ohm / 3 };
  const vAt = (cur: number) => {
    const vLit = 2 * singleDiodeVoltage(lit, cur, sub, d.temp_c);
    const vShaded = cur < shaded.iph_a * 0.995 ? singleDiodeVoltage(shaded, Math.max(cur, -0.1 * shaded.iph_a), sub, d.temp_c) : -0.45;
    return vLit + Math.max(vShaded, -0.45);
  };
  // Sample the I(V) relation on a fine current grid, then read it off at even voltages.
  const fine: { v: number; i: number }[] = [];
  for (let k = 0; k <= 4000; k++) {
    // From a little past open circuit (negative current) up to just below the photocurrent.
    const cur = p.iph_a * (-0.1 + (1.099 * k) / 4000);
    fine.push({ v: vAt(cur), i: cur });
  }
  fine.sort((a, b) => a.v - b.v);
  for (let k = 0; k < points; k++) {
    const x = (1.02 * voc * k) / (points - 1);
    let j = fine.findIndex((q) => q.v >= x);
    if (j === -1) j = fine.length - 1;
    if (j === 0) j = 1;
    const a = fine[j - 1];
    const b = fine[Math.min(j, fine.length - 1)];
    const t = b.v === a.v ? 0 : (x - a.v) / (b.v - a.v);
    v.push(x);
    i.push(a.i + t * (b.i - a.i) + noise * normal());
  }
  return { v, i };
}

function write(b: BatchSpec) {
  const dir = path.join(OUT, b.slug);
  mkdirSync(dir, { recursive: true });
  const day = new Date(`${b.batch_date}T07:30:00Z`).getTime();
  b.devices.forEach((d, idx) => {
    const { v, i } = curveOf(d, b.cells, b.cells === 1 ? 110 : 140);
    const lines = [
      `# device: ${d.id}`,
      `# cell temperature: ${d.temp_c}`,
      '# irradiance: 1000',
      `# cells in series: ${b.cells}`,
      `# area: ${b.area_cm2}`,
      `# measured at: ${new Date(day + idx * 47_000 + Math.floor(rnd() * 9000)).toISOString()}`,
      'Voltage (V),Current (A)',
      ...v.map((x, k) => `${x.toFixed(5)},${i[k].toFixed(5)}`),
    ];
    writeFileSync(path.join(dir, `${d.id}.csv`), lines.join('\n') + '\n');
  });
  const { devices: _d, ...meta } = b;
  return { ...meta, files: b.devices.map((d) => `${d.id}.csv`) };
}

rmSync(OUT, { recursive: true, force: true });
const manifest = [
  write(cells()),
  write(modules('kf-m60-2611', 'KF-M60 line 2, lot 2611', 'line 2', 'M2611', '2026-11-14', 'Aster Wafer (invented)', 0.34, 10.45, true)),
  write(modules('kf-m60-2612', 'KF-M60 line 3, lot 2612', 'line 3', 'M2612', '2026-11-14', 'Brightfold Cells (invented)', 0.41, 10.38, false)),
];
writeFileSync(path.join(OUT, 'manifest.json'), JSON.stringify(manifest, null, 2) + '\n');
console.log(`wrote ${manifest.reduce((s, b) => s + b.files.length, 0)} curves in ${manifest.length} batches to ${OUT}`);
