/**
 * Small dense linear algebra for symmetric positive-definite matrices (n ≤ ~10).
 * Cholesky factorisation A = L·Lᵀ (Golub GH, Van Loan CF. Matrix Computations, 4th ed., 2013, Alg. 4.2.1).
 */
import { EngineError } from '../errors';

export type Matrix = number[][];

/** Lower-triangular L with A = L·Lᵀ, or `undefined` if A is not positive definite. Does not modify A. */
export function cholesky(a: readonly (readonly number[])[]): Matrix | undefined {
  const n = a.length;
  const l: Matrix = Array.from({ length: n }, () => new Array<number>(n).fill(0));
  for (let j = 0; j < n; j++) {
    let d = a[j]![j]!;
    for (let k = 0; k < j; k++) d -= l[j]![k]! ** 2;
    if (!(d > 0) || !Number.isFinite(d)) return undefined;
    const ljj = Math.sqrt(d);
    l[j]![j] = ljj;
    for (let i = j + 1; i < n; i++) {
      let s = a[i]![j]!;
      for (let k = 0; k < j; k++) s -= l[i]![k]! * l[j]![k]!;
      l[i]![j] = s / ljj;
    }
  }
  return l;
}

/** Inverse of a symmetric positive-definite matrix via Cholesky, or `undefined` if not positive definite. */
export function inverseSpd(a: readonly (readonly number[])[]): Matrix | undefined {
  const l = cholesky(a);
  if (!l) return undefined;
  const n = a.length;
  const inv: Matrix = Array.from({ length: n }, () => new Array<number>(n).fill(0));
  for (let col = 0; col < n; col++) {
    // solve L y = e_col, then Lᵀ x = y
    const y = new Array<number>(n).fill(0);
    for (let i = 0; i < n; i++) {
      let s = i === col ? 1 : 0;
      for (let k = 0; k < i; k++) s -= l[i]![k]! * y[k]!;
      y[i] = s / l[i]![i]!;
    }
    for (let i = n - 1; i >= 0; i--) {
      let s = y[i]!;
      for (let k = i + 1; k < n; k++) s -= l[k]![i]! * inv[k]![col]!;
      inv[i]![col] = s / l[i]![i]!;
    }
  }
  return inv;
}

/** Quadratic form vᵀ·A·v. */
export function quadraticForm(a: readonly (readonly number[])[], v: readonly number[]): number {
  let s = 0;
  for (let i = 0; i < v.length; i++)
    for (let j = 0; j < v.length; j++) s += v[i]! * a[i]![j]! * v[j]!;
  return s;
}

/** Throws unless `a` is a square matrix of finite numbers of size n. */
export function assertSquare(
  fn: string,
  a: readonly (readonly number[])[],
  n: number,
  field: string,
): void {
  if (a.length !== n || a.some((row) => row.length !== n || row.some((x) => !Number.isFinite(x)))) {
    throw new EngineError(
      'invalid-input',
      `${fn}: ${field} must be a ${n}×${n} matrix of finite numbers`,
      field,
    );
  }
}
