/**
 * Bad input to the device-physics functions. `input` names the offending input (as the caller
 * spelled it, e.g. "temp_k" or "beta_v_per_k") so a form or the command line can point at it.
 */
export class PhysicsError extends Error {
  readonly input: string;

  constructor(input: string, message: string) {
    super(message);
    this.name = 'PhysicsError';
    this.input = input;
  }
}

/**
 * A number inside a message: at most six significant digits, so a temperature typed in °C and
 * turned into kelvin reads −26.85 K, not −26.850000000000023 K.
 */
export function num(x: number): string {
  if (!Number.isFinite(x)) return String(x);
  return String(Number(x.toPrecision(6))).replace(/^-/, '−');
}

/** Throws unless `value` is a finite number; returns it for chaining. */
export function requireFinite(input: string, value: number): number {
  if (typeof value !== 'number' || !Number.isFinite(value)) {
    throw new PhysicsError(input, `${input} must be a finite number (got ${String(value)})`);
  }
  return value;
}

/** Throws unless `value` is finite and > 0. */
export function requirePositive(input: string, value: number): number {
  requireFinite(input, value);
  if (value <= 0) throw new PhysicsError(input, `${input} must be greater than 0 (got ${num(value)})`);
  return value;
}

/** Throws unless `value` is finite and ≥ 0. */
export function requireNonNegative(input: string, value: number): number {
  requireFinite(input, value);
  if (value < 0) throw new PhysicsError(input, `${input} must not be negative (got ${num(value)})`);
  return value;
}
