/**
 * `fermi`: the normalised Fermi–Dirac integral F½(η) beside its Boltzmann limit e^η.
 * `--json` prints {"f_half","boltzmann"}; η outside [−40, 100] exits 2.
 */
import {
  formatNumber,
  formatTable,
  runCommand,
  requiredNumber,
  usageText,
} from '@/cli/command-line';
import { boltzmannHalf, ETA_RANGE, fermiHalf } from '@/lib/physics/fermi-dirac';

export const summary = 'Fermi–Dirac integral F½(η) and its Boltzmann limit e^η';

const OPTIONS = { eta: `reduced Fermi level η = (E_F − Ec)/k_BT, from ${ETA_RANGE.min} to ${ETA_RANGE.max}` };
const USAGE = usageText('fermi --eta X [--json]', OPTIONS);
const FLAGS = { eta: 'eta' };

/** Runs the command; returns the exit status (0 ok, 2 bad input). */
export async function run(argv: string[]): Promise<number> {
  return runCommand(argv, { options: OPTIONS, usage: USAGE, flags: FLAGS }, async (parsed) => {
    const eta = requiredNumber(parsed, 'eta');
    const fHalf = fermiHalf(eta);
    const boltzmann = boltzmannHalf(eta);
    if (parsed.json) {
      process.stdout.write(`${JSON.stringify({ f_half: fHalf, boltzmann })}\n`);
      return 0;
    }
    const table = formatTable(`Fermi–Dirac integral at η = ${eta}`, [
      ['F½(η), Fermi–Dirac', formatNumber(fHalf, 12), ''],
      ['e^η, Boltzmann limit', formatNumber(boltzmann, 12), ''],
      ['Boltzmann error', ((boltzmann / fHalf - 1) * 100).toPrecision(4), '%'],
    ], ['F½ is normalised so that F½(η) → e^η as η → −∞ (Blakemore 1982); accurate to 1e-9 relative.']);
    process.stdout.write(`${table}\n`);
    return 0;
  });
}
