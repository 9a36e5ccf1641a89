/**
 * Classical fixed-step fourth-order Runge-Kutta (RK4), our own implementation.
 *
 * Method (Kutta W. Z Math Phys 1901;46:435-53; as in Hairer E, Nørsett SP, Wanner G. Solving Ordinary
 * Differential Equations I, 2nd ed., 1993, §II.1, Table 1.2 "the classical Runge-Kutta method"):
 *   k1 = f(y_n)
 *   k2 = f(y_n + h/2·k1)
 *   k3 = f(y_n + h/2·k2)
 *   k4 = f(y_n + h·k3)
 *   y_{n+1} = y_n + h/6·(k1 + 2k2 + 2k3 + k4)
 * Local error O(h⁵), global error O(h⁴).
 *
 * The systems integrated here are autonomous between events: every discontinuity of the right-hand side
 * (dose, infusion start or stop) is a segment boundary, and the caller advances each segment separately
 * with a whole number of equal steps, so no step ever straddles a discontinuity (time itself never enters f).
 *
 * Stability: for dy/dt = −λy one step multiplies y by R(z) = 1 + z + z²/2 + z³/6 + z⁴/24, z = −hλ.
 * |R(z)| < 1 for 0 < hλ < 2.785293563 (stability limit), and 0 < R(z) < 1 throughout that interval, so a
 * decaying mode decays monotonically and never changes sign or overshoots its equilibrium. The engine keeps
 * hλ far below the limit (see `defaultSimulateOptions.maxRateStep`).
 */

/** An autonomous right-hand side dy/dt = f(y); writes f(y) into `dy` without allocating. */
export interface OdeSystem {
  readonly dimension: number;
  derivative(y: Float64Array, dy: Float64Array): void;
}

/** Preallocated stage buffers for `rk4Advance`, so stepping never allocates. */
export interface Rk4Workspace {
  readonly k1: Float64Array;
  readonly k2: Float64Array;
  readonly k3: Float64Array;
  readonly k4: Float64Array;
  readonly stage: Float64Array;
}

/** RK4's real-axis stability limit for dy/dt = −λy: |R(−hλ)| < 1 for hλ below this (computed by bisection). */
export const RK4_STABILITY_LIMIT = 2.785293563;

/** Allocate the stage buffers for a system of the given dimension. */
export function createRk4Workspace(dimension: number): Rk4Workspace {
  return {
    k1: new Float64Array(dimension),
    k2: new Float64Array(dimension),
    k3: new Float64Array(dimension),
    k4: new Float64Array(dimension),
    stage: new Float64Array(dimension),
  };
}

/**
 * Advance `y` in place by `steps` classical RK4 steps of size `h` (4 evaluations per step).
 * @example
 * const sys = { dimension: 1, derivative: (y, dy) => { dy[0] = -(y[0] as number); } };
 * const y = Float64Array.of(1);
 * rk4Advance(sys, y, 0.1, 10, createRk4Workspace(1)); // y[0] ≈ e^−1 = 0.367879...
 */
export function rk4Advance(
  system: OdeSystem,
  y: Float64Array,
  h: number,
  steps: number,
  ws: Rk4Workspace,
): void {
  const n = system.dimension;
  const { k1, k2, k3, k4, stage } = ws;
  const h2 = 0.5 * h;
  const h6 = h / 6;
  for (let s = 0; s < steps; s++) {
    system.derivative(y, k1);
    for (let i = 0; i < n; i++) stage[i] = (y[i] as number) + h2 * (k1[i] as number);
    system.derivative(stage, k2);
    for (let i = 0; i < n; i++) stage[i] = (y[i] as number) + h2 * (k2[i] as number);
    system.derivative(stage, k3);
    for (let i = 0; i < n; i++) stage[i] = (y[i] as number) + h * (k3[i] as number);
    system.derivative(stage, k4);
    for (let i = 0; i < n; i++) {
      y[i] =
        (y[i] as number) +
        h6 *
          ((k1[i] as number) + 2 * (k2[i] as number) + 2 * (k3[i] as number) + (k4[i] as number));
    }
  }
}
