/**
 * `split`: quasi-Fermi levels and their splitting for doped silicon carrying an excess carrier
 * density, Fermi–Dirac statistics with the Boltzmann result beside it. Energies are measured
 * from the intrinsic level E_i. `--json` prints {"splitting_ev","implied_voc_v","efn_ev","efp_ev"}.
 */
import {
  formatNumber,
  formatTable,
  numberOption,
  runCommand,
  requiredNumber,
  UsageError,
  usageText,
} from '@/cli/command-line';
import { quasiFermiLevels } from '@/lib/physics/carriers';
import type { DopingType, InjectionInput } from '@/lib/physics/carriers';

export const summary = 'quasi-Fermi-level splitting and implied Voc for a doping and an injection';

const OPTIONS = {
  'doping-cm3': 'net dopant density, cm⁻³ (fully ionised)',
  type: 'doping type: p or n',
  'excess-cm3': 'excess carrier density Δn = Δp, cm⁻³',
  'generation-cm3s': 'or: generation rate, cm⁻³·s⁻¹ (with --lifetime-s)',
  'lifetime-s': 'effective lifetime, s (with --generation-cm3s)',
  'temp-k': 'temperature, K (150–500)',
};
const USAGE = usageText('split --doping-cm3 N --type p|n --excess-cm3 D --temp-k T [--json]', OPTIONS);
const FLAGS = {
  doping_cm3: 'doping-cm3',
  type: 'type',
  excess_cm3: 'excess-cm3',
  generation_cm3_s: 'generation-cm3s',
  lifetime_s: 'lifetime-s',
  temp_k: 'temp-k',
};

const ev = (x: number) => x.toFixed(5);

/** Runs the command; returns the exit status (0 ok, 2 bad input). */
export async function run(argv: string[]): Promise<number> {
  return runCommand(argv, { options: OPTIONS, usage: USAGE, flags: FLAGS }, async (parsed) => {
    const type = parsed.values.type;
    if (type === undefined) throw new UsageError('--type is required (p or n)', '--type');
    if (type !== 'p' && type !== 'n') throw new UsageError(`--type must be p or n (got "${type}")`, '--type');
    const input: InjectionInput = {
      type: type as DopingType,
      doping_cm3: requiredNumber(parsed, 'doping-cm3'),
      temp_k: requiredNumber(parsed, 'temp-k'),
      excess_cm3: numberOption(parsed, 'excess-cm3'),
      generation_cm3_s: numberOption(parsed, 'generation-cm3s'),
      lifetime_s: numberOption(parsed, 'lifetime-s'),
    };
    const q = quasiFermiLevels(input);
    if (parsed.json) {
      process.stdout.write(
        `${JSON.stringify({ splitting_ev: q.splitting_ev, implied_voc_v: q.implied_voc_v, efn_ev: q.efn_ev, efp_ev: q.efp_ev })}\n`,
      );
      return 0;
    }
    const table = formatTable(
      `${type}-type silicon, ${formatNumber(input.doping_cm3)} cm⁻³, Δn = ${formatNumber(q.excess_cm3)} cm⁻³, ${input.temp_k} K`,
      [
        ['Conduction band edge Ec', ev(q.edges.ec_ev), 'eV'],
        ['Electron quasi-Fermi level E_Fn', ev(q.efn_ev), 'eV'],
        ['Equilibrium Fermi level E_F', ev(q.ef_ev), 'eV'],
        ['Intrinsic level E_i', ev(0), 'eV'],
        ['Hole quasi-Fermi level E_Fp', ev(q.efp_ev), 'eV'],
        ['Valence band edge Ev', ev(q.edges.ev_ev), 'eV'],
        ['Electrons n', formatNumber(q.n_cm3), 'cm⁻³'],
        ['Holes p', formatNumber(q.p_cm3), 'cm⁻³'],
        ['Splitting E_Fn − E_Fp (Fermi–Dirac)', ev(q.splitting_ev), 'eV'],
        ['Implied Voc (Fermi–Dirac)', q.implied_voc_v.toFixed(4), 'V'],
        ['Splitting (Boltzmann)', ev(q.boltzmann.splitting_ev), 'eV'],
        ['Implied Voc (Boltzmann)', q.boltzmann.implied_voc_v.toFixed(4), 'V'],
      ],
      [
        'Energies from the intrinsic level E_i. Dopants fully ionised, no band-gap narrowing.',
        ...(q.degenerate ? ['Degenerate: a band lies within 2·k_BT of a Fermi level; the Boltzmann line is off.'] : []),
      ],
    );
    process.stdout.write(`${table}\n`);
    return 0;
  });
}
