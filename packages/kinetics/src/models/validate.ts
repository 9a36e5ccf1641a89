import { EngineError } from '../errors';

/** Throws `EngineError('invalid-input')` unless `value` is a finite number > 0. */
export function requirePositive(fn: string, field: string, value: unknown): number {
  if (typeof value !== 'number' || !Number.isFinite(value) || value <= 0) {
    throw new EngineError(
      'invalid-input',
      `${fn}: ${field} must be a finite number > 0 (got ${String(value)})`,
      field,
    );
  }
  return value;
}

/** Throws `EngineError('invalid-input')` unless `value` is a finite number ≥ 0. */
export function requireNonNegative(fn: string, field: string, value: unknown): number {
  if (typeof value !== 'number' || !Number.isFinite(value) || value < 0) {
    throw new EngineError(
      'invalid-input',
      `${fn}: ${field} must be a finite number ≥ 0 (got ${String(value)})`,
      field,
    );
  }
  return value;
}

/** Throws `EngineError('invalid-input')` unless `value` is a finite number. */
export function requireFinite(fn: string, field: string, value: unknown): number {
  if (typeof value !== 'number' || !Number.isFinite(value)) {
    throw new EngineError(
      'invalid-input',
      `${fn}: ${field} must be a finite number (got ${String(value)})`,
      field,
    );
  }
  return value;
}
