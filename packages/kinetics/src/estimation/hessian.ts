/**
 * Numerical Hessian by central finite differences (Abramowitz M, Stegun IA. Handbook of Mathematical
 * Functions, 1964, eq. 25.3.23 for ∂²f/∂x² and 25.3.26 for the mixed ∂²f/∂x∂y).
 * Step per coordinate h_i; error O(h²). Cost: 1 + 2n + 4·n(n−1)/2 evaluations.
 */
export function numericalHessian(
  f: (x: readonly number[]) => number,
  x: readonly number[],
  step: number | readonly number[] = 1e-3,
): { hessian: number[][]; evaluations: number } {
  const n = x.length;
  const h = (i: number): number => (typeof step === 'number' ? step : step[i]!);
  let evaluations = 0;
  const at = (d: Readonly<Record<number, number>>): number => {
    evaluations++;
    return f(x.map((v, i) => v + (d[i] ?? 0)));
  };
  const f0 = at({});
  const hess: number[][] = Array.from({ length: n }, () => new Array<number>(n).fill(0));
  for (let i = 0; i < n; i++) {
    const hi = h(i);
    hess[i]![i] = (at({ [i]: hi }) - 2 * f0 + at({ [i]: -hi })) / (hi * hi);
    for (let j = 0; j < i; j++) {
      const hj = h(j);
      const v =
        (at({ [i]: hi, [j]: hj }) -
          at({ [i]: hi, [j]: -hj }) -
          at({ [i]: -hi, [j]: hj }) +
          at({ [i]: -hi, [j]: -hj })) /
        (4 * hi * hj);
      hess[i]![j] = v;
      hess[j]![i] = v;
    }
  }
  return { hessian: hess, evaluations };
}
