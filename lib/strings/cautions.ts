/**
 * The high-voltage caution shown wherever module, string or test voltages are displayed,
 * sized or exported. One source for every screen, export and command.
 */

/** The usual extra-low-voltage touch limit for DC, in volts (common practice; codes differ). */
export const ELV_LIMIT_V = 60;

/** True when |voltage_v| exceeds the extra-low-voltage limit and should be highlighted. */
export function isAboveElv(voltage_v: number): boolean {
  return Number.isFinite(voltage_v) && Math.abs(voltage_v) > ELV_LIMIT_V;
}

export type Caution = { title: string; bullets: readonly string[]; short: string };

/** Title, bullet sentences and a one-line form for tight places (tables, JSON, CSV notes). */
export const HV_CAUTION: Caution = {
  title: 'High voltage: read before you act on these numbers',
  bullets: [
    'A PV module generates voltage whenever light reaches it; it has no off switch, and covering or disconnecting one part does not make the rest safe.',
    'Series strings reach hundreds to 1500 V DC. A DC arc does not go out on its own the way an AC arc does at each zero crossing: never open a connector under load.',
    `Anything above ${ELV_LIMIT_V} V DC is beyond the usual extra-low-voltage limit for touch (common practice; codes differ) and is highlighted.`,
    'Flash testers and insulation or wet-leakage testers apply high voltage to the module under test; keep to the test station’s interlocks and procedures.',
    'Figures here, including string lengths, are design guidance only. Local electrical codes, the module and inverter manufacturers’ ratings and licensed practice decide.',
  ],
  short:
    'High voltage DC: modules are live in light and cannot be switched off; DC arcs do not self-extinguish; test equipment applies high voltage. Design guidance only — local electrical codes, manufacturers’ ratings and licensed practice decide.',
};

/** The caution as plain text (title, then one "- " line per bullet), for terminals and files. */
export function cautionText(caution: Caution = HV_CAUTION): string {
  return [`! ${caution.title}`, ...caution.bullets.map((b) => `- ${b}`)].join('\n');
}
