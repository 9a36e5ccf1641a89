/**
 * Nelder–Mead downhill simplex minimiser, unconstrained, for a handful of parameters.
 *
 * Method: Nelder JA, Mead R. A simplex method for function minimization. Comput J 1965;7:308–313,
 * with the standard coefficients and the shrink rule as stated by Lagarias JC, Reeds JA, Wright MH,
 * Wright PE. SIAM J Optim 1998;9:112–147 (reflection ρ=1, expansion χ=2, contraction γ=½, shrink σ=½).
 * Termination (Lagarias et al. §5): the spread of objective values on the simplex is ≤ `fTolerance`
 * AND the largest vertex distance from the best vertex is ≤ `xTolerance`.
 * Symbols: the source's x₁…x_{n+1} are `simplex[0..n]` kept sorted by value.
 */
import { EngineError } from '../errors';

export interface NelderMeadOptions {
  /** Absolute tolerance on the spread of objective values over the simplex. */
  readonly fTolerance: number;
  /** Absolute tolerance on the simplex size (max distance to best vertex), in parameter units. */
  readonly xTolerance: number;
  /** Hard cap on objective evaluations. */
  readonly maxEvaluations: number;
  /** Initial simplex step per coordinate (a number for all, or one per coordinate). */
  readonly initialStep: number | readonly number[];
}

/** Defaults: tolerances suit an objective of order 1–100 in log-parameter space. */
export const nelderMeadDefaultOptions: Readonly<NelderMeadOptions> = Object.freeze({
  fTolerance: 1e-9,
  xTolerance: 1e-7,
  maxEvaluations: 4000,
  initialStep: 0.3,
});

export interface NelderMeadResult {
  readonly x: number[];
  readonly value: number;
  readonly outcome: 'converged' | 'max-evaluations';
  readonly evaluations: number;
  readonly iterations: number;
}

/**
 * Minimise `f` from `x0`.
 * @throws EngineError `invalid-input` if x0 is empty or not finite, or f(x0) is not finite.
 * @example nelderMead(([x, y]) => (x! - 1) ** 2 + (y! + 2) ** 2, [0, 0]).x // => about [1, -2]
 */
export function nelderMead(
  f: (x: readonly number[]) => number,
  x0: readonly number[],
  options: Partial<NelderMeadOptions> = {},
): NelderMeadResult {
  const o = { ...nelderMeadDefaultOptions, ...options };
  const n = x0.length;
  if (n === 0 || x0.some((v) => !Number.isFinite(v))) {
    throw new EngineError(
      'invalid-input',
      'nelderMead: x0 must be a non-empty array of finite numbers',
      'x0',
    );
  }
  let evaluations = 0;
  const evalf = (x: readonly number[]): number => {
    evaluations++;
    const v = f(x);
    return Number.isFinite(v) ? v : Number.POSITIVE_INFINITY;
  };
  const start = evalf(x0);
  if (!Number.isFinite(start)) {
    throw new EngineError(
      'invalid-input',
      'nelderMead: objective is not finite at the starting point',
      'x0',
    );
  }
  const pts: number[][] = [x0.slice()];
  const vals: number[] = [start];
  for (let i = 0; i < n; i++) {
    const p = x0.slice();
    const step = typeof o.initialStep === 'number' ? o.initialStep : (o.initialStep[i] ?? 0.3);
    p[i] = p[i]! + (step === 0 ? 0.1 : step);
    pts.push(p);
    vals.push(evalf(p));
  }
  let iterations = 0;
  const order = (): void => {
    const idx = pts.map((_, i) => i).sort((a, b) => vals[a]! - vals[b]!);
    const p2 = idx.map((i) => pts[i]!);
    const v2 = idx.map((i) => vals[i]!);
    for (let i = 0; i <= n; i++) {
      pts[i] = p2[i]!;
      vals[i] = v2[i]!;
    }
  };
  const converged = (): boolean => {
    if (vals[n]! - vals[0]! > o.fTolerance) return false;
    let size = 0;
    for (let i = 1; i <= n; i++)
      for (let j = 0; j < n; j++) size = Math.max(size, Math.abs(pts[i]![j]! - pts[0]![j]!));
    return size <= o.xTolerance;
  };
  order();
  while (!converged()) {
    if (evaluations >= o.maxEvaluations) {
      return {
        x: pts[0]!.slice(),
        value: vals[0]!,
        outcome: 'max-evaluations',
        evaluations,
        iterations,
      };
    }
    iterations++;
    const centroid = new Array<number>(n).fill(0);
    for (let i = 0; i < n; i++)
      for (let j = 0; j < n; j++) centroid[j] = centroid[j]! + pts[i]![j]! / n;
    const worst = pts[n]!;
    const along = (t: number): number[] => centroid.map((c, j) => c + t * (c - worst[j]!));
    const xr = along(1);
    const fr = evalf(xr);
    if (fr < vals[0]!) {
      const xe = along(2);
      const fe = evalf(xe);
      if (fe < fr) {
        pts[n] = xe;
        vals[n] = fe;
      } else {
        pts[n] = xr;
        vals[n] = fr;
      }
    } else if (fr < vals[n - 1]!) {
      pts[n] = xr;
      vals[n] = fr;
    } else {
      const outside = fr < vals[n]!;
      const xc = along(outside ? 0.5 : -0.5);
      const fc = evalf(xc);
      if (outside ? fc <= fr : fc < vals[n]!) {
        pts[n] = xc;
        vals[n] = fc;
      } else {
        for (let i = 1; i <= n; i++) {
          pts[i] = pts[i]!.map((v, j) => pts[0]![j]! + 0.5 * (v - pts[0]![j]!));
          vals[i] = evalf(pts[i]!);
        }
      }
    }
    order();
  }
  return { x: pts[0]!.slice(), value: vals[0]!, outcome: 'converged', evaluations, iterations };
}
