/**
 * Oral loading doses split into portions (common practice for phenytoin: large single oral doses are
 * absorbed slowly and poorly tolerated, so a loading dose is given in parts of about 400 mg a few hours
 * apart). Which drugs split is the drug model's `practical.oralLoadingPortionMg`. One rule for the
 * regimen finder (Michaelis-Menten loading), the API's planned doses, the plan's administration list and
 * the browser's what-if, so all four show the same doses.
 */

/** Largest portion, mg, and the time between portions, h (common practice; site-configurable). */
export const ORAL_LOADING_PORTION_MG = 400;
export const ORAL_LOADING_SPACING_H = 2;

export interface LoadingPortion {
  /** Hours after the first portion. */
  readonly offsetH: number;
  readonly amount: number;
}

/** The portions of an oral loading dose: equal-size parts of at most `portionMg`, the last one smaller. */
export function oralLoadingPortions(
  amount: number,
  portionMg: number = ORAL_LOADING_PORTION_MG,
  spacingH: number = ORAL_LOADING_SPACING_H,
): LoadingPortion[] {
  const out: LoadingPortion[] = [];
  let left = amount;
  for (let i = 0; left > 1e-9; i++) {
    const part = Math.min(portionMg, left);
    out.push({ offsetH: i * spacingH, amount: part });
    left -= part;
  }
  return out;
}

/**
 * When the first maintenance dose follows a split loading dose: one interval after the first portion,
 * and never sooner than one spacing after the last portion.
 */
export function maintenanceAfterPortions(
  portions: readonly LoadingPortion[],
  intervalH: number,
  spacingH: number = ORAL_LOADING_SPACING_H,
): number {
  const last = portions[portions.length - 1]?.offsetH ?? 0;
  return Math.max(intervalH, last + spacingH);
}
