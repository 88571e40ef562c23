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
  if (value <= 0) throw new PhysicsError(input, `${input} must be greater than 0 (got ${value})`);
  return value;
}

/** Throws unless `value` is finite and ≥ 0. */
export function requireNonNegative(input: string, value: number): number {
  requireFinite(input, value);
  if (value < 0) throw new PhysicsError(input, `${input} must not be negative (got ${value})`);
  return value;
}
