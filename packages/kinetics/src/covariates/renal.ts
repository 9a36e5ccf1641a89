import { EngineError } from '../errors';
import { adjustedBodyWeight, idealBodyWeightDevine } from './body-size';
import { checkAge, checkHeight, checkScrMgDl, checkWeight, requireSex, type Sex } from './checks';

/** Which weight goes into Cockcroft-Gault: a local-protocol choice (common practice). */
export type WeightBasis = 'actual' | 'ideal' | 'adjusted';

/** Input of `cockcroftGault`. Serum creatinine in mg/dL (convert µmol/L with `creatinineMgDlFromUmolL`). */
export interface CockcroftGaultInput {
  readonly ageYears: number;
  readonly sex: Sex;
  /** Total (actual) body weight, kg. */
  readonly weightKg: number;
  /** Required when `weightBasis` is `ideal` or `adjusted`. */
  readonly heightCm?: number;
  readonly serumCreatinineMgDl: number;
  /** Default `actual`. */
  readonly weightBasis?: WeightBasis;
  /** Adjusted-weight factor, default 0.4. */
  readonly adjustmentFactor?: number;
}

/**
 * Creatinine clearance, mL/min, by Cockcroft-Gault: (140 − age)·weight / (72·SCr), × 0.85 if female.
 * Source: Cockcroft DW, Gault MH. Prediction of creatinine clearance from serum creatinine.
 * Nephron 1976;16:31-41. The weight used (actual, Devine ideal, or adjusted) is the caller's choice.
 * @throws {EngineError} `invalid-input` for impossible inputs (weight ≤ 0, creatinine 0, height in the wrong
 *   unit, age under 18 — use `egfrBedsideSchwartz` for children).
 * @example cockcroftGault({ ageYears: 60, sex: 'male', weightKg: 72, serumCreatinineMgDl: 1 }) // => 80
 */
export function cockcroftGault(input: CockcroftGaultInput): number {
  const fn = 'cockcroftGault';
  if (input == null || typeof input !== 'object') {
    throw new EngineError('invalid-input', `${fn}: input must be an object`, 'input');
  }
  const age = checkAge(fn, input.ageYears, 18, 120);
  const sex = requireSex(fn, input.sex);
  const tbw = checkWeight(fn, input.weightKg);
  const scr = checkScrMgDl(fn, input.serumCreatinineMgDl);
  const basis = input.weightBasis ?? 'actual';
  let weight = tbw;
  if (basis === 'ideal' || basis === 'adjusted') {
    const ibw = idealBodyWeightDevine(checkHeight(fn, input.heightCm), sex);
    weight = basis === 'ideal' ? ibw : adjustedBodyWeight(ibw, tbw, input.adjustmentFactor ?? 0.4);
  } else if (basis !== 'actual') {
    throw new EngineError(
      'invalid-input',
      `${fn}: weightBasis must be "actual", "ideal" or "adjusted" (got ${String(basis)})`,
      'weightBasis',
    );
  }
  const crcl = ((140 - age) * weight) / (72 * scr);
  return sex === 'female' ? 0.85 * crcl : crcl;
}

/** Input of `egfrCkdEpi2021`. IDMS-standardised serum creatinine, mg/dL. */
export interface CkdEpiInput {
  readonly serumCreatinineMgDl: number;
  readonly ageYears: number;
  readonly sex: Sex;
}

/**
 * eGFR, mL/min/1.73 m², CKD-EPI 2021 creatinine equation without race:
 * 142 × min(SCr/κ, 1)^α × max(SCr/κ, 1)^−1.200 × 0.9938^age × 1.012 [female];
 * κ = 0.7 (F) / 0.9 (M), α = −0.241 (F) / −0.302 (M).
 * Source: Inker LA, Eneanya ND, Coresh J, et al. New creatinine- and cystatin C-based equations to estimate
 * GFR without race. N Engl J Med 2021;385:1737-49. Normalised to 1.73 m²: de-normalise with ×BSA/1.73 if needed.
 * @throws {EngineError} `invalid-input` (creatinine 0, age < 18).
 * @example egfrCkdEpi2021({ serumCreatinineMgDl: 1.2, ageYears: 60, sex: 'male' }) // => 69.2311
 */
export function egfrCkdEpi2021(input: CkdEpiInput): number {
  const fn = 'egfrCkdEpi2021';
  if (input == null || typeof input !== 'object') {
    throw new EngineError('invalid-input', `${fn}: input must be an object`, 'input');
  }
  const scr = checkScrMgDl(fn, input.serumCreatinineMgDl);
  const age = checkAge(fn, input.ageYears, 18, 120);
  const sex = requireSex(fn, input.sex);
  const kappa = sex === 'female' ? 0.7 : 0.9;
  const alpha = sex === 'female' ? -0.241 : -0.302;
  const r = scr / kappa;
  const egfr = 142 * Math.min(r, 1) ** alpha * Math.max(r, 1) ** -1.2 * 0.9938 ** age;
  return sex === 'female' ? egfr * 1.012 : egfr;
}

/** Input of `egfrBedsideSchwartz`. */
export interface SchwartzInput {
  readonly heightCm: number;
  readonly serumCreatinineMgDl: number;
  /** Optional; when given it must be within 1–18 years, the population the equation was built on. */
  readonly ageYears?: number;
}

/**
 * eGFR, mL/min/1.73 m², for children by the bedside Schwartz equation: 0.413 × height(cm) / SCr(mg/dL)
 * (IDMS creatinine; ages 1–18 y).
 * Source: Schwartz GJ, Muñoz A, Schneider MF, et al. New equations to estimate GFR in children with CKD.
 * J Am Soc Nephrol 2009;20:629-37.
 * @throws {EngineError} `invalid-input` (creatinine 0, height in wrong unit, age outside 1–18).
 * @example egfrBedsideSchwartz({ heightCm: 120, serumCreatinineMgDl: 0.5 }) // => 99.12
 */
export function egfrBedsideSchwartz(input: SchwartzInput): number {
  const fn = 'egfrBedsideSchwartz';
  if (input == null || typeof input !== 'object') {
    throw new EngineError('invalid-input', `${fn}: input must be an object`, 'input');
  }
  const h = checkHeight(fn, input.heightCm);
  const scr = checkScrMgDl(fn, input.serumCreatinineMgDl);
  if (input.ageYears !== undefined) checkAge(fn, input.ageYears, 1, 18);
  return (0.413 * h) / scr;
}
