/**
 * `ni`: intrinsic carrier density, band gap and effective densities of states of silicon at a
 * temperature. `--json` prints {"ni_cm3","eg_ev","nc_cm3","nv_cm3"}; bad input exits 2.
 */
import {
  formatNumber,
  formatTable,
  runCommand,
  requiredNumber,
  usageText,
} from '@/cli/command-line';
import { materialAt, SILICON } from '@/lib/physics/materials';

export const summary = 'silicon n_i, Eg, Nc and Nv at a temperature (K)';

const OPTIONS = { 'temp-k': 'temperature, K (150–500)' };
const USAGE = usageText('ni --temp-k T [--json]', OPTIONS);
const FLAGS = { temp_k: 'temp-k' };

/** Runs the command; returns the exit status (0 ok, 2 bad input). */
export async function run(argv: string[]): Promise<number> {
  return runCommand(argv, { options: OPTIONS, usage: USAGE, flags: FLAGS }, async (parsed) => {
    const temp_k = requiredNumber(parsed, 'temp-k');
    const s = materialAt(temp_k);
    if (parsed.json) {
      process.stdout.write(`${JSON.stringify({ ni_cm3: s.ni_cm3, eg_ev: s.eg_ev, nc_cm3: s.nc_cm3, nv_cm3: s.nv_cm3 })}\n`);
      return 0;
    }
    const table = formatTable(
      `Silicon at ${temp_k} K`,
      [
        ['Intrinsic density n_i', formatNumber(s.ni_cm3), 'cm⁻³'],
        ['Band gap Eg', s.eg_ev.toFixed(5), 'eV'],
        ['Conduction-band density of states Nc', formatNumber(s.nc_cm3), 'cm⁻³'],
        ['Valence-band density of states Nv', formatNumber(s.nv_cm3), 'cm⁻³'],
        ['Thermal energy k_BT', s.kt_ev.toFixed(6), 'eV'],
      ],
      [
        'Sources:',
        `  n_i: ${SILICON.sources.intrinsic_density}`,
        `  Eg:  ${SILICON.sources.bandgap}`,
        `  Nc, Nv: ${SILICON.sources.density_of_states}`,
      ],
    );
    process.stdout.write(`${table}\n`);
    return 0;
  });
}
