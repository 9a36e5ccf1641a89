/**
 * Standard normal distribution helpers.
 *
 * erfc: Chebyshev fit with fractional error < 1.2e-7 everywhere (Press WH, Teukolsky SA, Vetterling WT,
 * Flannery BP. Numerical Recipes in C, 2nd ed., 1992, §6.2, function erfcc — from memory).
 * Written as t·exp(poly) so its logarithm stays accurate far into the tail, which Beal's M3 likelihood needs.
 */

function logErfcPositive(x: number): number {
  // x >= 0
  const t = 1 / (1 + 0.5 * x);
  const poly =
    -x * x -
    1.26551223 +
    t *
      (1.00002368 +
        t *
          (0.37409196 +
            t *
              (0.09678418 +
                t *
                  (-0.18628806 +
                    t *
                      (0.27886807 +
                        t *
                          (-1.13520398 +
                            t * (1.48851587 + t * (-0.82215223 + t * 0.17087277))))))));
  return Math.log(t) + poly;
}

/** Complementary error function. @example erfc(0) // => 1 */
export function erfc(x: number): number {
  if (x >= 0) return Math.exp(logErfcPositive(x));
  return 2 - Math.exp(logErfcPositive(-x));
}

/** Standard normal CDF Φ(z) = erfc(−z/√2)/2. @example normalCdf(0) // => 0.5 */
export function normalCdf(z: number): number {
  return 0.5 * erfc(-z / Math.SQRT2);
}

/** ln Φ(z), accurate for very negative z (no underflow to ln 0). @example logNormalCdf(-40) // => about -804.6 */
export function logNormalCdf(z: number): number {
  const x = -z / Math.SQRT2;
  if (x >= 0) return Math.log(0.5) + logErfcPositive(x);
  return Math.log(0.5 * (2 - Math.exp(logErfcPositive(-x))));
}

/** z for a two-sided 90 % interval, Φ⁻¹(0.95) = 1.6448536 (standard tables). */
export const Z_90 = 1.6448536269514722;
