import type { ResolvedModel } from './parameters';

/**
 * Advance the 4-state PK system in place by `n` classical RK4 steps of size `h` with infusion rate `rate`
 * (mg/h) constant over the steps. State: [depot, central, peripheral, AUC] (see `createSystem`).
 */
export type PkStepper = (y: Float64Array, h: number, n: number, rate: number) => void;

/**
 * Specialised steppers: exactly the classical RK4 of `rk4Advance` (Kutta 1901; Hairer, Nørsett, Wanner 1993,
 * §II.1) applied to the model right-hand sides of `createSystem`, with the right-hand side written out in
 * scalar locals instead of called through an interface. Same arithmetic, no per-step allocation or calls:
 * this is what makes a 14-day profile cost well under a millisecond. The tests check that each stepper
 * agrees with `rk4Advance` + `createSystem` to rounding.
 */
export function createStepper(m: ResolvedModel): PkStepper {
  const ka = m.ka;
  const k12 = m.k12;
  const k21 = m.k21;
  const invV1 = 1 / m.V1;
  if (!m.michaelisMenten) {
    const out = m.k10 + m.k12;
    return (y, h, n, rate) => {
      let x0 = y[0] as number;
      let x1 = y[1] as number;
      let x2 = y[2] as number;
      let x3 = y[3] as number;
      const h2 = 0.5 * h;
      const h6 = h / 6;
      for (let s = 0; s < n; s++) {
        // k1 = f(x)
        const a0 = -ka * x0;
        const a1 = ka * x0 + rate - out * x1 + k21 * x2;
        const a2 = k12 * x1 - k21 * x2;
        const a3 = x1 * invV1;
        // k2 = f(x + h/2·k1)
        let u0 = x0 + h2 * a0;
        let u1 = x1 + h2 * a1;
        let u2 = x2 + h2 * a2;
        const b0 = -ka * u0;
        const b1 = ka * u0 + rate - out * u1 + k21 * u2;
        const b2 = k12 * u1 - k21 * u2;
        const b3 = u1 * invV1;
        // k3 = f(x + h/2·k2)
        u0 = x0 + h2 * b0;
        u1 = x1 + h2 * b1;
        u2 = x2 + h2 * b2;
        const c0 = -ka * u0;
        const c1 = ka * u0 + rate - out * u1 + k21 * u2;
        const c2 = k12 * u1 - k21 * u2;
        const c3 = u1 * invV1;
        // k4 = f(x + h·k3)
        u0 = x0 + h * c0;
        u1 = x1 + h * c1;
        u2 = x2 + h * c2;
        const d0 = -ka * u0;
        const d1 = ka * u0 + rate - out * u1 + k21 * u2;
        const d2 = k12 * u1 - k21 * u2;
        const d3 = u1 * invV1;
        x0 += h6 * (a0 + 2 * b0 + 2 * c0 + d0);
        x1 += h6 * (a1 + 2 * b1 + 2 * c1 + d1);
        x2 += h6 * (a2 + 2 * b2 + 2 * c2 + d2);
        x3 += h6 * (a3 + 2 * b3 + 2 * c3 + d3);
      }
      y[0] = x0;
      y[1] = x1;
      y[2] = x2;
      y[3] = x3;
    };
  }
  const vmax = m.vmax;
  const km = m.km;
  return (y, h, n, rate) => {
    let x0 = y[0] as number;
    let x1 = y[1] as number;
    let x2 = y[2] as number;
    let x3 = y[3] as number;
    const h2 = 0.5 * h;
    const h6 = h / 6;
    for (let s = 0; s < n; s++) {
      let cc = x1 * invV1;
      const a0 = -ka * x0;
      const a1 = ka * x0 + rate - (vmax * cc) / (km + cc) - k12 * x1 + k21 * x2;
      const a2 = k12 * x1 - k21 * x2;
      const a3 = cc;
      let u0 = x0 + h2 * a0;
      let u1 = x1 + h2 * a1;
      let u2 = x2 + h2 * a2;
      cc = u1 * invV1;
      const b0 = -ka * u0;
      const b1 = ka * u0 + rate - (vmax * cc) / (km + cc) - k12 * u1 + k21 * u2;
      const b2 = k12 * u1 - k21 * u2;
      const b3 = cc;
      u0 = x0 + h2 * b0;
      u1 = x1 + h2 * b1;
      u2 = x2 + h2 * b2;
      cc = u1 * invV1;
      const c0 = -ka * u0;
      const c1 = ka * u0 + rate - (vmax * cc) / (km + cc) - k12 * u1 + k21 * u2;
      const c2 = k12 * u1 - k21 * u2;
      const c3 = cc;
      u0 = x0 + h * c0;
      u1 = x1 + h * c1;
      u2 = x2 + h * c2;
      cc = u1 * invV1;
      const d0 = -ka * u0;
      const d1 = ka * u0 + rate - (vmax * cc) / (km + cc) - k12 * u1 + k21 * u2;
      const d2 = k12 * u1 - k21 * u2;
      const d3 = cc;
      x0 += h6 * (a0 + 2 * b0 + 2 * c0 + d0);
      x1 += h6 * (a1 + 2 * b1 + 2 * c1 + d1);
      x2 += h6 * (a2 + 2 * b2 + 2 * c2 + d2);
      x3 += h6 * (a3 + 2 * b3 + 2 * c3 + d3);
    }
    y[0] = x0;
    y[1] = x1;
    y[2] = x2;
    y[3] = x3;
  };
}
