import { EngineError } from '../errors';

/** Biological sex as used by the covariate equations (they have only two forms). */
export type Sex = 'male' | 'female';

/** Throws `invalid-input` unless `value` is finite and within [min, max]; `hint` explains a likely unit mix-up. */
export function requireInRange(
  fn: string,
  field: string,
  value: unknown,
  min: number,
  max: number,
  unit: string,
  hint = '',
): number {
  if (typeof value !== 'number' || !Number.isFinite(value) || value < min || value > max) {
    throw new EngineError(
      'invalid-input',
      `${fn}: ${field} must be between ${min} and ${max} ${unit} (got ${String(value)})${hint ? `; ${hint}` : ''}`,
      field,
    );
  }
  return value;
}

export function requireSex(fn: string, value: unknown): Sex {
  if (value !== 'male' && value !== 'female') {
    throw new EngineError(
      'invalid-input',
      `${fn}: sex must be "male" or "female" (got ${String(value)})`,
      'sex',
    );
  }
  return value;
}

export const checkWeight = (fn: string, v: unknown, field = 'weightKg'): number =>
  requireInRange(fn, field, v, 0.3, 400, 'kg', 'weight is in kilograms and must be > 0');
export const checkHeight = (fn: string, v: unknown, field = 'heightCm'): number =>
  requireInRange(fn, field, v, 30, 250, 'cm', 'height is in centimetres (not metres or inches)');
export const checkAge = (fn: string, v: unknown, min = 0, max = 120): number =>
  requireInRange(fn, 'ageYears', v, min, max, 'years');
export const checkScrMgDl = (fn: string, v: unknown): number => {
  if (v === 0) {
    throw new EngineError(
      'invalid-input',
      `${fn}: serumCreatinineMgDl must be > 0 (a creatinine of 0 is impossible)`,
      'serumCreatinineMgDl',
    );
  }
  return requireInRange(
    fn,
    'serumCreatinineMgDl',
    v,
    0.05,
    25,
    'mg/dL',
    'values above 25 look like µmol/L: convert with creatinineMgDlFromUmolL',
  );
};
