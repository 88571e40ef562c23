/**
 * The key table: every quantity that leaves the process (API, CLI JSON, CSV, stored JSON), with
 * its label as a person reads it, the unit it is shown in, how many digits it is shown with and
 * how the stored value becomes the shown one (FF and efficiency are fractions in the engine and
 * % on screen). Screens, exports, reasons and messages take labels and units from here only.
 *
 * `key` is the one name of the quantity everywhere — API, CLI JSON, CSV columns, stored JSON and
 * the engine's result types: snake_case with the unit as suffix (`temp_c`, `eg_dos_ev`,
 * `j0_a_cm2`). There are no aliases. Pure data and functions, no I/O.
 */
import { sig } from '@/lib/numeric/significant';

/** Where a quantity comes from. */
export type QuantityGroup = 'curve' | 'metric' | 'fit' | 'derived' | 'material' | 'carriers' | 'device' | 'translation' | 'strings' | 'characterisation' | 'uncertainty' | 'statistic' | 'record';

export type Quantity = {
  /** snake_case with the unit as suffix, e.g. "isc_a", "temp_c". */
  key: string;
  /** As a person reads it: "Isc", "Pmax at STC". */
  label: string;
  /** Unit as shown; '' for a plain number. */
  unit: string;
  /** Unit of the value as stored and sent; '' for a fraction or a plain number. */
  storedUnit: string;
  /** shown = stored × scale (100 for a fraction shown in %). */
  scale: number;
  /** Fixed decimals of the shown value, or null for significant digits. */
  decimals: number | null;
  /** Significant digits when `decimals` is null. */
  digits: number;
  group: QuantityGroup;
};

type Extra = { stored?: string; scale?: number; decimals?: number; digits?: number };

function q(group: QuantityGroup, key: string, label: string, unit: string, extra: Extra = {}): Quantity {
  return {
    key,
    label,
    unit,
    storedUnit: extra.stored ?? unit,
    scale: extra.scale ?? 1,
    decimals: extra.decimals ?? null,
    digits: extra.digits ?? 4,
    group,
  };
}

/** A fraction shown as a percentage with `decimals` decimals. */
const percent = (decimals: number): Extra => ({ stored: '', scale: 100, decimals });
/** A count. */
const count: Extra = { decimals: 0 };

export const QUANTITIES: readonly Quantity[] = [
  // The measured curve and what is known about the device.
  q('curve', 'voltage_v', 'Voltage', 'V'),
  q('curve', 'current_a', 'Current', 'A'),
  q('curve', 'temp_c', 'Cell temperature', '°C'),
  q('curve', 'irradiance_w_m2', 'Irradiance', 'W/m²'),
  q('curve', 'irradiance_spread_pct', 'Irradiance change during the sweep', '%', { decimals: 1 }),
  q('curve', 'cells', 'Cells in series', '', count),
  q('curve', 'area_cm2', 'Area', 'cm²'),
  // The uploaded file the curve was read from (the raw-data archive).
  q('curve', 'file_size_bytes', 'File size', 'bytes', count),
  q('curve', 'nameplate_w', 'Nameplate power', 'W'),
  q('curve', 'mean_pmp_w', 'Mean Pmax', 'W'),

  // Key figures without a model (lib/iv Metrics); the STC figures (curve.stc) use the same keys.
  q('metric', 'isc_a', 'Isc', 'A'),
  q('metric', 'voc_v', 'Voc', 'V'),
  q('metric', 'pmp_w', 'Pmax', 'W'),
  q('metric', 'imp_a', 'Imp', 'A'),
  q('metric', 'vmp_v', 'Vmp', 'V'),
  q('metric', 'ff', 'FF', '%', percent(1)),
  q('metric', 'efficiency', 'Efficiency', '%', percent(2)),
  q('metric', 'rsh0_ohm', 'Rsh0 (slope)', 'Ω'),
  q('metric', 'rs0_ohm', 'Rs0 (slope)', 'Ω'),

  // Diode fits (lib/iv FitResult) and the comparison of the two models.
  q('fit', 'iph_a', 'Iph', 'A'),
  q('fit', 'i0_a', 'I0', 'A'),
  q('fit', 'n', 'n', ''),
  q('fit', 'i01_a', 'I01', 'A'),
  q('fit', 'n1', 'n1', ''),
  q('fit', 'i02_a', 'I02', 'A'),
  q('fit', 'n2', 'n2', ''),
  q('fit', 'rs_ohm', 'Rs', 'Ω'),
  q('fit', 'rsh_ohm', 'Rsh', 'Ω'),
  q('fit', 'rmse_a', 'RMSE', 'A'),
  q('fit', 'rmse_true_current_a', 'RMSE of the true current', 'A'),
  q('fit', 'max_residual_a', 'Largest residual', 'A'),
  q('fit', 'residuals_a', 'Residuals', 'A'),
  q('fit', 'evaluations', 'Evaluations', '', count),
  q('fit', 'elapsed_ms', 'Time', 'ms', { digits: 3 }),
  q('fit', 'bic_single', 'BIC, single diode', '', { digits: 5 }),
  q('fit', 'bic_double', 'BIC, double diode', '', { digits: 5 }),
  q('fit', 'delta_bic', 'ΔBIC (double − single)', '', { digits: 3 }),
  q('fit', 'rmse_ratio', 'RMSE ratio (double/single)', '', { digits: 3 }),

  // Figures derived from a fit.
  q('derived', 'stc_pmp_w', 'Pmax at STC', 'W'),
  q('derived', 'j0_a_cm2', 'J0', 'A/cm²'),
  q('derived', 'j01_a_cm2', 'J01', 'A/cm²'),
  q('derived', 'j02_a_cm2', 'J02', 'A/cm²'),
  q('derived', 'j0_25c_a_cm2', 'J0 at 25 °C', 'A/cm²'),
  q('derived', 'jsc_a_cm2', 'Jsc', 'A/cm²'),
  q('derived', 'cell_area_cm2', 'Cell area', 'cm²'),
  q('derived', 'stc_voc_v', 'Voc at STC', 'V'),
  q('derived', 'stc_vmp_v', 'Vmp at STC', 'V'),

  // FF and efficiency as the CSV exports write them: already in % (lib/quality/export-columns.ts).
  q('metric', 'ff_pct', 'FF', '%', { decimals: 2 }),
  q('metric', 'eff_pct', 'Efficiency', '%', { decimals: 2 }),

  // Material (lib/physics/materials).
  q('material', 'temp_k', 'Temperature', 'K'),
  q('material', 'eg_ev', 'Band gap Eg', 'eV'),
  q('material', 'eg_dos_ev', 'Ec − Ev from n_i and Nc·Nv', 'eV'),
  q('material', 'nc_cm3', 'Nc', 'cm⁻³'),
  q('material', 'nv_cm3', 'Nv', 'cm⁻³'),
  q('material', 'ni_cm3', 'n_i', 'cm⁻³'),
  q('material', 'kt_ev', 'kT', 'eV'),
  q('material', 'max_doping_cm3', 'Largest doping', 'cm⁻³'),
  q('material', 'model_at_reference_cm3', 'n_i of the model at the reference', 'cm⁻³'),
  q('material', 'from_k', 'From', 'K'),
  q('material', 'to_k', 'To', 'K'),

  // Carriers and band diagrams (lib/physics/carriers); energies in eV from E_i.
  q('carriers', 'doping_cm3', 'Doping density', 'cm⁻³'),
  q('carriers', 'excess_cm3', 'Excess carrier density', 'cm⁻³'),
  q('carriers', 'generation_cm3_s', 'Generation rate', 'cm⁻³·s⁻¹'),
  q('carriers', 'lifetime_s', 'Lifetime', 's'),
  q('carriers', 'n_cm3', 'Electrons n', 'cm⁻³'),
  q('carriers', 'p_cm3', 'Holes p', 'cm⁻³'),
  q('carriers', 'n0_cm3', 'Electrons n0 (dark)', 'cm⁻³'),
  q('carriers', 'p0_cm3', 'Holes p0 (dark)', 'cm⁻³'),
  q('carriers', 'ec_ev', 'Ec', 'eV'),
  q('carriers', 'ev_ev', 'Ev', 'eV'),
  q('carriers', 'ei_ev', 'Ei', 'eV'),
  q('carriers', 'ef_ev', 'EF', 'eV'),
  q('carriers', 'efn_ev', 'EFn', 'eV'),
  q('carriers', 'efp_ev', 'EFp', 'eV'),
  q('carriers', 'splitting_ev', 'EFn − EFp', 'eV'),
  q('carriers', 'boltzmann_splitting_ev', 'EFn − EFp (Boltzmann)', 'eV'),
  q('carriers', 'implied_voc_v', 'Implied Voc', 'V'),
  q('carriers', 'implied_voc_25c_v', 'Implied Voc at 25 °C', 'V'),
  q('carriers', 'energy_ev', 'Energy', 'eV'),
  q('carriers', 'eta_n', 'ηn = (EF − Ec)/kT', '', { digits: 3 }),
  q('carriers', 'eta_p', 'ηp = (Ev − EF)/kT', '', { digits: 3 }),
  q('carriers', 'occupation_equilibrium', 'f(E) with EF', '', { digits: 3 }),
  q('carriers', 'occupation_electrons', 'f(E) with EFn', '', { digits: 3 }),
  q('carriers', 'occupation_holes', '1 − f(E) with EFp', '', { digits: 3 }),
  q('carriers', 'boltzmann_error_n', 'Boltzmann error in n', '%', percent(2)),
  q('carriers', 'boltzmann_error_p', 'Boltzmann error in p', '%', percent(2)),

  // Physics of a fitted device (lib/physics/fit-physics).
  q('device', 'fit_temp_c', 'Fit temperature', '°C'),
  q('device', 'from_c', 'From', '°C'),
  q('device', 'to_c', 'To', '°C'),
  q('device', 'step_c', 'Step', '°C'),
  q('device', 'beta_v_per_k', 'β, Voc temperature coefficient', 'V/K'),
  q('device', 'beta_pct_per_k', 'β, Voc temperature coefficient', '%/K', { digits: 3 }),
  q('device', 'beta_per_cell_v_per_k', 'β per cell', 'V/K'),
  q('device', 'alpha_isc_rel_per_k', 'α, relative Isc coefficient', '1/K'),
  q('device', 'diode1_a', 'Diode 1 current (diffusion)', 'A'),
  q('device', 'diode2_a', 'Diode 2 current (depletion region)', 'A'),
  q('device', 'shunt_a', 'Shunt current', 'A'),
  q('device', 'diodes_a', 'Diode currents', 'A'),
  q('device', 'junction_v', 'Junction voltage V + I·Rs', 'V'),
  q('device', 'depletion_share', 'Depletion-region share', '%', percent(1)),
  q('device', 'diffusion_share', 'Diffusion share', '%', percent(1)),
  q('device', 'measured_voc_v', 'Measured Voc', 'V'),
  q('device', 'thermal_voltage_v', 'Thermal voltage kT/q', 'V'),

  // Translation to other conditions (lib/physics/translate) and its coefficients.
  q('translation', 'alpha_a_per_k', 'α, Isc temperature coefficient', 'A/K'),
  q('translation', 'alpha_rel_per_k', 'α, relative Isc coefficient', '1/K'),
  q('translation', 'beta_rel_per_k', 'β, relative Voc coefficient', '1/K'),
  q('translation', 'kappa_ohm_per_k', 'κ, curve correction factor', 'Ω/K'),
  q('translation', 'a_irradiance', 'a, irradiance correction of Voc', ''),
  q('translation', 'alpha_isc_a_per_k', 'α, Isc temperature coefficient', 'A/K'),
  q('translation', 'isc1_a', 'Isc as measured', 'A'),
  q('translation', 'voc1_v', 'Voc as measured', 'V'),
  q('translation', 'points_total', 'Points', '', count),
  // The STC figures' method and inputs (lib/analysis/stc.ts) and the batch's coefficients.
  q('translation', 'alpha_pct_per_k', 'α, Isc temperature coefficient', '%/K', { digits: 3 }),
  q('translation', 'gamma_pct_per_k', 'γ, Pmax temperature coefficient', '%/K', { digits: 3 }),
  q('translation', 'temp_tolerance_k', 'Temperature window around 25 °C', 'K', { digits: 2 }),
  q('translation', 'irradiance_tolerance_pct', 'Irradiance window around 1000 W/m²', '%', { digits: 2 }),
  q('translation', 'model_beta_pct_per_k', 'β of the fitted model', '%/K', { digits: 3 }),
  q('translation', 'model_gamma_pct_per_k', 'γ of the fitted model', '%/K', { digits: 3 }),
  q('translation', 'agreement_tolerance_pct', 'Agreement asked of the model', '%', { digits: 2 }),
  q('translation', 'model_temp_window_k', 'Model without coefficients: window around 25 °C', 'K', { digits: 2 }),

  // Measurement uncertainty (lib/quality/uncertainty.ts), decision rules and nameplate-relative limits (lib/quality/decision-rules.ts).
  q('uncertainty', 'u_pmp_w', 'Pmax uncertainty (k = 2)', 'W'),
  q('uncertainty', 'u_isc_a', 'Isc uncertainty (k = 2)', 'A'),
  q('uncertainty', 'u_voc_v', 'Voc uncertainty (k = 2)', 'V'),
  q('uncertainty', 'u_stc_pmp_w', 'Pmax at STC uncertainty (k = 2)', 'W'),
  q('uncertainty', 'u_pmp_pct_k2', 'Pmax uncertainty (k = 2)', '%', { decimals: 2 }),
  q('uncertainty', 'u_isc_pct_k2', 'Isc uncertainty (k = 2)', '%', { decimals: 2 }),
  q('uncertainty', 'u_voc_pct_k2', 'Voc uncertainty (k = 2)', '%', { decimals: 2 }),
  q('uncertainty', 'value', 'Value (in the unit given beside it)', '', { digits: 3 }),
  q('uncertainty', 'k', 'Coverage factor k', '', { digits: 3 }),
  q('uncertainty', 'inside_guard_band', 'Devices within their uncertainty of a limit', '', count),
  q('uncertainty', 'below_w', 'Below the nameplate by', 'W'),
  q('uncertainty', 'above_w', 'Above the nameplate by', 'W'),
  q('uncertainty', 'below_pct', 'Below the nameplate by', '%', { decimals: 2 }),
  q('uncertainty', 'above_pct', 'Above the nameplate by', '%', { decimals: 2 }),
  q('uncertainty', 'from_w', 'From nameplate +', 'W'),
  q('uncertainty', 'to_w', 'To nameplate +', 'W'),
  q('uncertainty', 'from_pct', 'From nameplate +', '%', { decimals: 2 }),
  q('uncertainty', 'to_pct', 'To nameplate +', '%', { decimals: 2 }),

  // String sizing (lib/strings): the request and the answer.
  q('strings', 'voc_stc_v', 'Voc at STC', 'V'),
  q('strings', 'beta_voc_pct_per_k', 'Voc coefficient', '%/K', { digits: 3 }),
  q('strings', 't_min_c', 'Record low ambient', '°C'),
  q('strings', 't_cell_max_c', 'Hottest cell temperature', '°C'),
  q('strings', 'v_sys_v', 'System voltage limit', 'V'),
  q('strings', 'vmp_stc_v', 'Vmp at STC', 'V'),
  q('strings', 'beta_vmp_pct_per_k', 'Vmp coefficient', '%/K', { digits: 3 }),
  q('strings', 'mpp_window_min_v', 'MPP window from', 'V'),
  q('strings', 'mpp_window_max_v', 'MPP window to', 'V'),
  q('strings', 'voc_max_per_module_v', 'Cold Voc per module', 'V'),
  q('strings', 'max_modules', 'Most modules in series', '', count),
  q('strings', 'string_voc_max_v', 'Cold string Voc', 'V'),
  q('strings', 'margin_v', 'Margin to the limit', 'V'),
  q('strings', 'margin_pct', 'Margin to the limit', '%', { decimals: 1 }),
  q('strings', 'min_modules', 'Least modules in series', '', count),
  q('strings', 'vmp_min_per_module_v', 'Hot Vmp per module', 'V'),
  q('strings', 'vmp_max_per_module_v', 'Cold Vmp per module', 'V'),
  q('strings', 'max_modules_mpp', 'Most modules in the MPP window', '', count),
  q('strings', 'modules', 'Modules compared', '', count),
  q('strings', 'count', 'Modules with a Voc', '', count),
  q('strings', 'index', 'Position in the list', '', count),
  q('strings', 'mean_voc_v', 'Mean Voc', 'V'),
  q('strings', 'slope_v_per_k', 'dVoc/dT', 'V/K'),
  q('strings', 'voc_at_25_v', 'Voc at 25 °C', 'V'),
  q('strings', 'curves', 'Curves', '', count),
  q('strings', 'span_k', 'Temperature span', 'K', { digits: 3 }),
  q('strings', 'r2', 'R²', '', { digits: 3 }),
  q('strings', 'points', 'Points on the line', '', count),
  q('strings', 'value_v', 'Value used', 'V'),
  q('strings', 'mean_v', 'Mean', 'V'),

  // Characterisation of a device type (lib/analysis/characterise): coefficients, IEC 60891 parameters, IEC 61853-1 matrix.
  q('characterisation', 'alpha_isc_pct_per_k', 'α, Isc temperature coefficient', '%/K', { digits: 3 }),
  q('characterisation', 'gamma_pmp_pct_per_k', 'γ, Pmax temperature coefficient', '%/K', { digits: 3 }),
  q('characterisation', 'beta_voc_v_per_k', 'β, Voc temperature coefficient', 'V/K'),
  q('characterisation', 'gamma_pmp_w_per_k', 'γ, Pmax temperature coefficient', 'W/K'),
  q('characterisation', 'pct_per_k', 'Temperature coefficient', '%/K', { digits: 3 }),
  q('characterisation', 'pct_per_k_se', 'Standard error of the coefficient', '%/K', { digits: 2 }),
  q('characterisation', 'relative_pct', 'Relative to its value at 25 °C', '%', { decimals: 2 }),
  q('characterisation', 'irradiance_wm2', 'Irradiance', 'W/m²'),
  q('characterisation', 'temp_min_c', 'Lowest cell temperature', '°C'),
  q('characterisation', 'temp_max_c', 'Highest cell temperature', '°C'),
  q('characterisation', 'rs_residual_pct', 'Rs determination: Pmax left over (RMS)', '%', { digits: 2 }),
  q('characterisation', 'kappa_residual_pct', 'κ determination: Pmax left over (RMS)', '%', { digits: 2 }),
  q('characterisation', 'a_residual_v', 'a determination: Voc left over (RMS)', 'V', { digits: 2 }),
  q('characterisation', 'relative_efficiency_pct', 'Efficiency relative to 1000 W/m²', '%', { decimals: 1 }),

  // Statistics of one parameter over a batch (lib/quality describe, welch): shown in the unit of
  // the parameter they describe, so the table gives no unit of their own. (The sample size of a
  // description is `n` by the statistics' own convention; `n` here is the ideality factor.)
  ...(
    [
      ['mean', 'Mean'], ['sd', 'Standard deviation'], ['min', 'Minimum'],
      ['max', 'Maximum'], ['p5', '5th percentile'], ['median', 'Median'],
      ['p95', '95th percentile'], ['p25', 'Lower quartile'], ['p75', 'Upper quartile'], ['difference', 'Difference of the means'], ['standard_error', 'Standard error of the difference'],
      ['ci_low', 'Confidence interval, low end'], ['ci_high', 'Confidence interval, high end'], ['mean_a', 'Mean of the first batch'],
      ['mean_b', 'Mean of the other batch'], ['sd_a', 'Standard deviation of the first batch'], ['sd_b', 'Standard deviation of the other batch'],
    ] as const
  ).map(([k, label]) => q('statistic', k, label, '')),
  q('statistic', 'cpk', 'Cpk', '', { decimals: 2 }),
  q('statistic', 'n_a', 'Devices in the first batch', '', count),
  q('statistic', 'n_b', 'Devices in the other batch', '', count),
  q('statistic', 't', 'Welch t', '', { digits: 3 }),
  q('statistic', 't_critical', 'Critical t', '', { digits: 3 }),
  q('statistic', 'dof', 'Degrees of freedom', '', { decimals: 1 }),
  q('statistic', 'p', 'p-value', '', { digits: 2 }),
  q('statistic', 'confidence', 'Confidence level', '%', percent(0)),
  q('statistic', 'robust_z', 'Modified z-score', '', { digits: 3 }),
  // Counts and bookkeeping numbers of the answers (batches, pages, reviews, releases, uploads, archive checks).
  ...(
    [
      ['total', 'Total'], ['pass', 'Passed'], ['fail', 'Failed'],
      ['outliers', 'Outliers'], ['curve_count', 'Curves'], ['page', 'Page'],
      ['page_size', 'Rows per page'], ['version', 'Version'], ['spec_version', 'Spec version'],
      ['base_version', 'Version edited from'], ['revision', 'Release revision'], ['accepted', 'Files accepted'],
      ['rejected', 'Files refused'], ['replaced', 'Curves replaced'], ['line', 'Line in the file'],
      ['sampled', 'Curves drawn'], ['checked', 'Originals checked'], ['deleted', 'Originals deleted'],
      ['without_cells', 'Devices without a cell count'], ['queued', 'Fits waiting'], ['fitting', 'Fits running'],
      ['done', 'Fits finished'], ['failed', 'Fits failed'], ['cancelled', 'Fits cancelled'], ['usable', 'Devices with figures'],
    ] as const
  ).map(([k, label]) => q('record', k, label, '', count)),
];

const BY_KEY: ReadonlyMap<string, Quantity> = (() => {
  const map = new Map<string, Quantity>();
  for (const x of QUANTITIES) {
    if (map.has(x.key)) throw new Error(`vocabulary: "${x.key}" is defined twice`);
    map.set(x.key, x);
  }
  return map;
})();

/** The quantity of a key ("temp_c"), or undefined for a key the table does not know. */
export function quantity(key: string): Quantity | undefined {
  return BY_KEY.get(key);
}

/** True when the key has an entry in the table. */
export function isKnownKey(key: string): boolean {
  return quantity(key) !== undefined;
}

/** Label as a person reads it; the key itself when it is not in the table. */
export function labelOf(key: string): string {
  return quantity(key)?.label ?? key;
}

/** Unit as shown on screen ('' for a plain number or an unknown key). */
export function unitOf(key: string): string {
  return quantity(key)?.unit ?? '';
}

/** Unit of the stored and sent value ('' for fractions, which are shown in %). */
export function storedUnitOf(key: string): string {
  return quantity(key)?.storedUnit ?? '';
}

/** "Isc (A)", "FF (%)", "n": a column header or a form label. */
export function labelWithUnit(key: string): string {
  const unit = unitOf(key);
  return unit ? `${labelOf(key)} (${unit})` : labelOf(key);
}

/** The stored value in the shown unit (FF 0.781 → 78.1); null stays null. */
export function toShown(key: string, value: number | null | undefined): number | null {
  if (value == null) return null;
  return value * (quantity(key)?.scale ?? 1);
}

/** Most digits (significant or decimals) a display ever gets: beyond it doubles show noise. */
const MAX_PRECISION = 15;

/** The table's own precision of a quantity: its fixed decimals, or its significant digits. */
function basePrecision(x: Quantity | undefined, digits?: number): number {
  if (x && x.decimals !== null) return x.decimals;
  return digits ?? x?.digits ?? 4;
}

/** The shown number of a stored value at `precision` (decimals when the quantity has fixed decimals, else significant digits), no unit. */
function shownNumber(x: Quantity | undefined, value: number, precision: number): string {
  const shown = value * (x?.scale ?? 1);
  return x && x.decimals !== null ? shown.toFixed(precision) : sig(shown, precision);
}

const withUnit = (x: Quantity | undefined, text: string) => (x?.unit ? `${text} ${x.unit}` : text);

/** A stored value with its unit ("0.7603 A", "78.1 %", '—' when missing); `digits` overrides significant digits; an unknown key shows the number alone. */
export function formatValue(key: string, value: number | null | undefined, digits?: number): string {
  if (value == null || !Number.isFinite(value)) return '—';
  const x = quantity(key);
  return withUnit(x, shownNumber(x, value, basePrecision(x, digits)));
}

/** The shown number alone ("0.7603", "78.1") for a cell whose header has the unit (labelWithUnit); '—' when missing. */
export function formatNumber(key: string, value: number | null | undefined, digits?: number): string {
  if (value == null || !Number.isFinite(value)) return '—';
  const x = quantity(key);
  return shownNumber(x, value, basePrecision(x, digits));
}

/**
 * The precision (the key's decimals or significant digits) at which `value` shows apart from each of `others` it does not
 * equal: the table's own, or more until they differ (42.0011 V beside a 42 V maximum shows 42.001). Capped at 15.
 */
export function precisionApart(key: string, value: number, others: readonly number[], digits?: number): number {
  const x = quantity(key);
  let p = basePrecision(x, digits);
  const differing = others.filter((o) => Number.isFinite(o) && o !== value);
  while (p < MAX_PRECISION && differing.some((o) => shownNumber(x, o, p) === shownNumber(x, value, p))) p++;
  return p;
}

/** A value and its limits with units at one precision that tells them apart: { value: "59.2 %", limits: ["70.0 %"] }. */
export function formatAgainst(key: string, value: number, limits: readonly number[]): { value: string; limits: string[] } {
  const x = quantity(key);
  const p = precisionApart(key, value, limits);
  return { value: withUnit(x, shownNumber(x, value, p)), limits: limits.map((l) => withUnit(x, shownNumber(x, l, p))) };
}

/** The number alone at a precision that tells it apart from `others` (a table cell beside a limit). */
export function formatNumberAgainst(key: string, value: number | null | undefined, others: readonly number[]): string {
  if (value == null || !Number.isFinite(value)) return '—';
  return shownNumber(quantity(key), value, precisionApart(key, value, others));
}
