/** Shared shapes of the I-V engine. Key names are part of the CLI/API contract. */

/** What is known about the device and the measurement; every field optional. */
export type CurveMeta = {
  device_id?: string;
  /** Cell temperature, °C. */
  temp_c?: number;
  /** Plane-of-array irradiance, W/m². */
  irradiance_w_m2?: number;
  /** Cells in series (1 for a single cell). */
  cells?: number;
  /** Device area, cm². */
  area_cm2?: number;
  /** Measurement time as written in the file (ISO 8601 when it could be read as a date). */
  measured_at?: string;
  /**
   * Change of the irradiance during the sweep, (max − min)/mean × 100 %, when the file has an
   * irradiance column (then `irradiance_w_m2` is that column's mean); lib/iv/meta-flags.ts flags it above 2 %.
   */
  irradiance_spread_pct?: number;
  /** Lines of the file's header block the reader has no field for, kept as written (key and value text). */
  extra?: MetaEntry[];
};

/** One line of a file's header block without a field of its own: "Operator,J. Doe" → { key: 'Operator', value: 'J. Doe' }. */
export type MetaEntry = { key: string; value: string };

/**
 * A measured curve: voltage ascending, generator convention (current positive while the
 * device delivers power). `notes` record what reading the file changed (units, sign, order).
 */
export type IvCurve = {
  voltage_v: number[];
  current_a: number[];
  meta: CurveMeta;
  notes: string[];
};

/** Model-free key figures. Null where a figure cannot be defined (for example Rsh0 of a flat line). */
export type Metrics = {
  isc_a: number;
  voc_v: number;
  pmp_w: number;
  imp_a: number;
  vmp_v: number;
  /** Fill factor Pmp/(Isc·Voc), a fraction. */
  ff: number;
  /** Pmp/(G·A), a fraction; null when irradiance or area is unknown. */
  efficiency: number | null;
  /** −1/(dI/dV) at V = 0, Ω; null when the slope is flat or rising. */
  rsh0_ohm: number | null;
  /** −dV/dI at I = 0, Ω; null when it cannot be determined. */
  rs0_ohm: number | null;
};

/** A finding about a curve or a fit, in words a line engineer understands. */
export type Flag = {
  code: string;
  severity: 'info' | 'warn' | 'fail';
  message: string;
};

/** Single-diode parameters; `n` is the ideality factor per cell. */
export type SingleDiodeParams = {
  iph_a: number;
  i0_a: number;
  n: number;
  rs_ohm: number;
  rsh_ohm: number;
};

/** Double-diode parameters; n1, n2 per cell. */
export type DoubleDiodeParams = {
  iph_a: number;
  i01_a: number;
  n1: number;
  i02_a: number;
  n2: number;
  rs_ohm: number;
  rsh_ohm: number;
};

/** Which residual is minimised: the model current solved exactly at each voltage, or the implicit equation's leftover. */
export type FitObjective = 'true-current' | 'implicit';

/** The fields every fit carries, whichever its model. */
export type FitBase = {
  objective: FitObjective;
  rmse_a: number | null;
  rmse_true_current_a: number | null;
  max_residual_a: number | null;
  /** Residuals of the chosen objective, A, one per measured point; empty for a failed fit. */
  residuals_a: number[];
  evaluations: number;
  converged: boolean;
  elapsed_ms: number;
  /** Standard errors in the parameters' own units, keyed like the parameters; null for a parameter held fixed or at a bound. */
  stderr: Record<string, number | null>;
  /** Bounds that were active at the optimum, e.g. ["i02_a ≤ 1e-6"]. */
  at_bounds?: string[];
  message?: string;
};

/** A model's parameters as a fit carries them: numbers when it converged, null when it did not. */
type Fitted<P> = { [K in keyof P]: P[K] | null };

/** Result of a single-diode fit: iph_a, i0_a, n, rs_ohm, rsh_ohm. */
export type SingleDiodeFit = FitBase & { model: 'single-diode' } & Fitted<SingleDiodeParams>;
/** Result of a double-diode fit: iph_a, i01_a, n1, i02_a, n2, rs_ohm, rsh_ohm. */
export type DoubleDiodeFit = FitBase & { model: 'double-diode' } & Fitted<DoubleDiodeParams>;

/**
 * Result of a model fit, told apart by `model`. When `converged` is false every parameter and
 * error figure is null and `message` says why: a fit that failed never hands out numbers that
 * look like a fit. `rmse_a` and `residuals_a` belong to the chosen objective;
 * `rmse_true_current_a` is always the true-current RMSE so fits of both objectives can be
 * compared. This is also the JSON stored in `fit.result` (db/schema.ts) and sent by the API and
 * the CLI: the keys are those of the earlier flat shape, so rows written before read as before.
 */
export type FitResult = SingleDiodeFit | DoubleDiodeFit;

/** The model names a fit carries. */
export type FitModel = FitResult['model'];

/** `Omit` applied to each member of a union (the plain one keeps only the keys all members share). */
export type OmitEach<T, K extends PropertyKey> = T extends unknown ? Omit<T, K> : never;

/** A fit without its per-point residuals, as lists send it. */
export type FitSummary = OmitEach<FitResult, 'residuals_a'>;
