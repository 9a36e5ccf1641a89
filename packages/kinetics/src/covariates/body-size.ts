import { EngineError } from '../errors';
import { checkHeight, checkWeight, requireInRange, requireSex, type Sex } from './checks';

/** Centimetres per inch (exact by definition). */
const CM_PER_INCH = 2.54;

/**
 * Ideal body weight, kg, by Devine: male 50 kg, female 45.5 kg, plus 2.3 kg per inch over 60 in.
 * Source: Devine BJ. Gentamicin therapy. Drug Intell Clin Pharm 1974;8:650-655.
 * @throws {EngineError} `invalid-input` for a height outside 30–250 cm; `out-of-range` below 60 in
 *   (152.4 cm), where the formula is not defined (use actual weight instead).
 * @example idealBodyWeightDevine(177.8, 'male') // => 73
 */
export function idealBodyWeightDevine(heightCm: number, sex: Sex): number {
  const fn = 'idealBodyWeightDevine';
  checkHeight(fn, heightCm);
  requireSex(fn, sex);
  const inches = heightCm / CM_PER_INCH;
  if (inches < 60 - 1e-9) {
    throw new EngineError(
      'out-of-range',
      `${fn}: heightCm ${heightCm} is below 60 in (152.4 cm), where the Devine formula is not defined`,
      'heightCm',
    );
  }
  return (sex === 'male' ? 50 : 45.5) + 2.3 * (inches - 60);
}

/**
 * Adjusted body weight, kg: AdjBW = IBW + factor·(TBW − IBW), factor 0.4 by default.
 * Source: widely taught 0.4 factor (Bauer LA, Applied Clinical Pharmacokinetics, aminoglycoside chapter — from memory).
 * When to use it (TBW > 120 % or > 130 % of IBW) is a local protocol choice left to the caller.
 * @example adjustedBodyWeight(73, 120) // => 91.8
 */
export function adjustedBodyWeight(idealKg: number, totalKg: number, factor = 0.4): number {
  const fn = 'adjustedBodyWeight';
  checkWeight(fn, idealKg, 'idealKg');
  checkWeight(fn, totalKg, 'totalKg');
  requireInRange(fn, 'factor', factor, 0, 1, '(fraction)');
  return idealKg + factor * (totalKg - idealKg);
}

/** Body-mass index, kg/m². */
export function bodyMassIndex(weightKg: number, heightCm: number): number {
  const fn = 'bodyMassIndex';
  checkWeight(fn, weightKg);
  const m = checkHeight(fn, heightCm) / 100;
  return weightKg / (m * m);
}

/**
 * Lean body weight, kg (Janmahasatian): male 9270·W/(6680 + 216·BMI), female 9270·W/(8780 + 244·BMI).
 * Source: Janmahasatian S, Duffull SB, Ash S, Ward LC, Byrne NM, Green B. Quantification of lean bodyweight.
 * Clin Pharmacokinet 2005;44:1051-65 (from memory).
 * @example leanBodyWeightJanmahasatian(80, 180, 'male') // => 60.41… (own example)
 */
export function leanBodyWeightJanmahasatian(weightKg: number, heightCm: number, sex: Sex): number {
  const fn = 'leanBodyWeightJanmahasatian';
  requireSex(fn, sex);
  const bmi = bodyMassIndex(weightKg, heightCm);
  return sex === 'male'
    ? (9270 * weightKg) / (6680 + 216 * bmi)
    : (9270 * weightKg) / (8780 + 244 * bmi);
}

/**
 * Body surface area, m², by Mosteller: √(height cm · weight kg / 3600).
 * Source: Mosteller RD. Simplified calculation of body-surface area. N Engl J Med 1987;317:1098.
 * @example bsaMosteller(180, 80) // => 2
 */
export function bsaMosteller(heightCm: number, weightKg: number): number {
  const fn = 'bsaMosteller';
  checkHeight(fn, heightCm);
  checkWeight(fn, weightKg);
  return Math.sqrt((heightCm * weightKg) / 3600);
}

/**
 * Body surface area, m², by Du Bois: 0.007184 · H^0.725 · W^0.425 (H cm, W kg).
 * Source: Du Bois D, Du Bois EF. A formula to estimate the approximate surface area if height and weight be
 * known. Arch Intern Med 1916;17:863-71.
 * @example bsaDuBois(180, 80) // => 1.996421
 */
export function bsaDuBois(heightCm: number, weightKg: number): number {
  const fn = 'bsaDuBois';
  checkHeight(fn, heightCm);
  checkWeight(fn, weightKg);
  return 0.007184 * heightCm ** 0.725 * weightKg ** 0.425;
}
