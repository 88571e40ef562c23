/** Flags about the measurement conditions a file gives (lib/iv/parse-conditions.ts), raised by analyseCurve. */
import type { CurveMeta, Flag } from '@/lib/iv/types';

/**
 * Largest change of the irradiance during one sweep, % of its mean, before it is flagged. A
 * limit asked for by the product's users (issue 14), common practice; in the IEC 60904-9 form
 * (max − min)/(max + min) it is about 1 %.
 */
export const IRRADIANCE_SPREAD_LIMIT_PCT = 2;

const f = (x: number, digits: number) => Number(x.toPrecision(digits)).toString();

/** 'irradiance-unsteady' when the irradiance column changed by more than 2 % of its mean during the sweep. */
export function measurementFlags(meta: CurveMeta | undefined): Flag[] {
  const flags: Flag[] = [];
  const spread = meta?.irradiance_spread_pct;
  const g = meta?.irradiance_w_m2;
  if (typeof spread === 'number' && spread > IRRADIANCE_SPREAD_LIMIT_PCT) {
    flags.push({
      code: 'irradiance-unsteady',
      severity: 'warn',
      message: `The irradiance changed by ${spread.toFixed(1)} % of its mean${typeof g === 'number' ? ` (${f(g, 4)} W/m²)` : ''} during the sweep, more than ${IRRADIANCE_SPREAD_LIMIT_PCT} %: Isc and Pmax follow the light, so they carry that change. Check the lamp or the reference cell.`,
    });
  }
  return flags;
}
