/** Shared test helpers and named tolerances for the engine tests. */

/** Agreement required between RK4 (default options) and the closed forms / odex: relative 1e-6 (issue 3). */
export const RK4_REL_TOL = 1e-6;

/** Relative error |a − b| / |b|, or absolute when the reference is below `floor`. */
export function relErr(actual: number, expected: number, floor = 1e-12): number {
  const d = Math.abs(actual - expected);
  return Math.abs(expected) > floor ? d / Math.abs(expected) : d;
}

/** Largest relative error over paired arrays, ignoring points where the reference is below `floor`. */
export function maxRelErr(
  actual: readonly number[],
  expected: readonly number[],
  floor: number,
): number {
  let worst = 0;
  for (let i = 0; i < expected.length; i++) {
    const e = expected[i] as number;
    const a = actual[i] as number;
    const err = Math.abs(e) > floor ? Math.abs(a - e) / Math.abs(e) : Math.abs(a - e) / floor;
    if (err > worst) worst = err;
  }
  return worst;
}

/** 0, step, 2·step … end inclusive (integer counter, no accumulated rounding). */
export function grid(start: number, end: number, step: number): number[] {
  const n = Math.round((end - start) / step);
  return Array.from({ length: n + 1 }, (_, i) => start + i * step);
}
