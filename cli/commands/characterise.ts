/**
 * `characterise FILE...`: a device type's behaviour from curves of one device measured at several
 * irradiances and cell temperatures (lib/analysis/characterise): α, β, γ with standard errors, the
 * IEC 60891 procedure 1 and 2 parameters, the IEC 61853-1 matrix and the STC figures. Irradiance,
 * cell temperature and cells come from each file's metadata lines. With `--json` one object; a
 * set that cannot be characterised gives `{ "error": … }` and exit status 2.
 */
import { readFileSync } from 'node:fs';
import path from 'node:path';
import { runCommand, UsageError, usageText } from '@/cli/command-line';
import { characterise } from '@/lib/analysis/characterise';
import type { Characterisation, CharCurve } from '@/lib/analysis/characterise';
import { IvInputError } from '@/lib/iv/errors';
import { keyFigures } from '@/lib/iv/key-figures';
import { parseIvText } from '@/lib/iv/parse';
import { parseQuantity } from '@/lib/units';

export const summary = 'characterise a device type from curves at several irradiances and temperatures (α, β, γ, IEC 60891, IEC 61853-1 matrix)';

const OPTIONS = {
  device: 'use only the files of this device id (default: the files must all name one device, or none — files without a device line are taken as one device)',
  area: 'device area with its unit, e.g. "1.63 m^2" or "243 cm^2" (default: from the files)',
};
const USAGE = usageText('characterise FILE... [--device ID] [--area AREA] [--json]', OPTIONS);

function readCurve(file: string): { curve: CharCurve; device: string | undefined } {
  let text: string;
  try {
    text = readFileSync(file, 'utf8');
  } catch (err) {
    throw new UsageError(`cannot read ${file}: ${(err as NodeJS.ErrnoException).code ?? String(err)}`, 'FILE');
  }
  try {
    // No file name: a file without a device line has no device id (the reader would take its name),
    // so a set of files that name no device is one device.
    const parsed = parseIvText(text, {});
    const { metrics } = keyFigures(parsed);
    const m = parsed.meta;
    if (m.irradiance_w_m2 == null) throw new UsageError(`${file} does not state its irradiance (a metadata line such as "Irradiance,800,W/m2")`, 'FILE');
    if (m.temp_c == null) throw new UsageError(`${file} does not state its cell temperature (a metadata line such as "Cell temperature,50,C")`, 'FILE');
    return {
      device: m.device_id,
      curve: { id: path.basename(file), irradiance_w_m2: m.irradiance_w_m2, temp_c: m.temp_c, voltage_v: parsed.voltage_v, current_a: parsed.current_a, metrics, cells: m.cells, area_cm2: m.area_cm2 },
    };
  } catch (err) {
    if (err instanceof IvInputError) throw new UsageError(`${file}: ${err.message}`, 'FILE');
    throw err;
  }
}

const f = (x: number | null | undefined, d: number) => (typeof x === 'number' && Number.isFinite(x) ? x.toFixed(d) : '—');

function text(r: Characterisation): string {
  const g = r.regression;
  const lines = [
    `${r.device ?? 'Device'}: ${r.curves} curves`,
    '',
    `Temperature coefficients at ${f(g.irradiance_wm2, 0)} W/m², ${f(g.temp_min_c, 1)}–${f(g.temp_max_c, 1)} °C (${g.curves} curves):`,
    ...(['alpha', 'beta', 'gamma'] as const).map((k) => {
      const c = g[k];
      const abs = k === 'alpha' ? `${r.alpha_isc_a_per_k.toPrecision(4)} A/K` : k === 'beta' ? `${r.beta_voc_v_per_k.toPrecision(4)} V/K` : `${r.gamma_pmp_w_per_k.toPrecision(4)} W/K`;
      return `  ${k === 'alpha' ? 'α (Isc) ' : k === 'beta' ? 'β (Voc) ' : 'γ (Pmax)'}  ${f(c.pct_per_k, 4)} ± ${f(c.pct_per_k_se, 4)} %/K   ${abs}   R² ${f(c.r2, 4)}`;
    }),
    '',
  ];
  const p1 = r.iec60891.procedure1;
  const p2 = r.iec60891.procedure2;
  lines.push('error' in p1 ? `IEC 60891 procedure 1: ${p1.error}` : `IEC 60891 procedure 1: Rs ${f(p1.rs_ohm, 4)} Ω (residual ${f(p1.rs_residual_pct, 3)} %), κ ${p1.kappa_ohm_per_k.toPrecision(4)} Ω/K (residual ${f(p1.kappa_residual_pct, 3)} %)`);
  lines.push('error' in p2 ? `IEC 60891 procedure 2: ${p2.error}` : `IEC 60891 procedure 2: a ${f(p2.a_irradiance, 4)}, Rs′ ${f(p2.rs_ohm, 4)} Ω, κ′ ${p2.kappa_ohm_per_k.toPrecision(4)} Ω/K (residuals ${f(p2.rs_residual_pct, 3)} %, ${f(p2.kappa_residual_pct, 3)} %)`);
  lines.push('', 'Power matrix (IEC 61853-1), Pmax in W (m measured, t translated):');
  const temps = [...new Set(r.matrix.map((c) => c.temp_c))].sort((a, b) => a - b);
  const gs = [...new Set(r.matrix.map((c) => c.irradiance_wm2))].sort((a, b) => a - b);
  lines.push(`  ${'W/m²'.padStart(6)}${temps.map((t) => `${t} °C`.padStart(11)).join('')}`);
  for (const gg of gs) {
    lines.push(`  ${String(gg).padStart(6)}${temps.map((t) => {
      const c = r.matrix.find((x) => x.irradiance_wm2 === gg && x.temp_c === t);
      return (c ? `${c.pmp_w.toFixed(2)} ${c.source[0]}` : '—').padStart(11);
    }).join('')}`);
  }
  if (r.stc) lines.push('', `STC: Pmax ${f(r.stc.pmp_w, 2)} W, Voc ${f(r.stc.voc_v, 3)} V, Isc ${f(r.stc.isc_a, 4)} A, FF ${f(r.stc.ff_pct, 2)} %`);
  if (r.notes.length) lines.push('', 'Notes:', ...r.notes.map((n) => `  - ${n}`));
  return lines.join('\n');
}

export async function run(argv: string[]): Promise<number> {
  return runCommand(argv, { options: OPTIONS, usage: USAGE, flags: {}, allowPositionals: true }, (parsed) => {
    if (!parsed.positionals.length) throw new UsageError('give the I-V files of one device', 'FILE');
    let read = parsed.positionals.map(readCurve);
    const wanted = parsed.values.device;
    if (wanted !== undefined) read = read.filter((x) => x.device === wanted);
    const devices = [...new Set(read.map((x) => x.device).filter((d): d is string => !!d))];
    if (devices.length > 1) throw new UsageError(`the files are of ${devices.length} devices (${devices.slice(0, 4).join(', ')}); choose one with --device`, '--device');
    const curves = read.map((x) => x.curve);
    if (parsed.values.area !== undefined) {
      const a = parseQuantity(parsed.values.area, 'area');
      if ('error' in a) throw new UsageError(`--area: ${a.error}`, '--area');
      for (const c of curves) c.area_cm2 = a.value;
    }
    const r = characterise(curves, { device: devices[0] ?? wanted ?? null });
    if ('error' in r) {
      if (parsed.json) process.stdout.write(`${JSON.stringify({ error: r.error })}\n`);
      else process.stderr.write(`error: ${r.error}\n`);
      return 2;
    }
    process.stdout.write(`${parsed.json ? JSON.stringify(r) : text(r)}\n`);
    return 0;
  });
}
