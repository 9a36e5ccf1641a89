import { EngineError } from '../errors';

/**
 * Conversion factor between serum creatinine units: 1 mg/dL = 88.4 µmol/L
 * (molar mass of creatinine 113.12 g/mol gives 88.40; 88.4 is the factor used in practice — common practice).
 */
export const CREATININE_UMOL_PER_MG_DL = 88.4;

function assertPositiveFinite(fn: string, value: number, field: string): void {
  if (!Number.isFinite(value) || value <= 0) {
    throw new EngineError(
      'invalid-input',
      `${fn}: ${field} must be a positive number (got ${value})`,
      field,
    );
  }
}

/** Serum creatinine µmol/L → mg/dL. @example creatinineMgDlFromUmolL(88.4) // => 1 */
export function creatinineMgDlFromUmolL(umolL: number): number {
  assertPositiveFinite('creatinineMgDlFromUmolL', umolL, 'creatinine');
  return umolL / CREATININE_UMOL_PER_MG_DL;
}

/** Serum creatinine mg/dL → µmol/L. @example creatinineUmolLFromMgDl(1) // => 88.4 */
export function creatinineUmolLFromMgDl(mgDl: number): number {
  assertPositiveFinite('creatinineUmolLFromMgDl', mgDl, 'creatinine');
  return mgDl * CREATININE_UMOL_PER_MG_DL;
}
