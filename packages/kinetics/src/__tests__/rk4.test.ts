import { Solver } from 'odex';
import { describe, expect, it } from 'vitest';
import { closedFormConcentrations } from '../closed-form/linear';
import { michaelisMentenSteadyState, michaelisMentenTime90 } from '../closed-form/michaelis-menten';
import { createRk4Workspace, rk4Advance, RK4_STABILITY_LIMIT } from '../integrator/rk4';
import { resolveModel } from '../models/parameters';
import { createSystem } from '../models/rhs';
import { createStepper } from '../models/steppers';
import { simulate } from '../simulate';
import type { Dose, ModelStructure, PkParameters } from '../types';
import { grid, maxRelErr, relErr, RK4_REL_TOL } from './helpers';

const ONE: ModelStructure = { compartments: 1, elimination: 'linear' };
const TWO: ModelStructure = { compartments: 2, elimination: 'linear' };
const MM1: ModelStructure = { compartments: 1, elimination: 'michaelis-menten' };

/**
 * Reference solution by odex 2.0.4 (Hairer's ODEX extrapolation code, littleredcomputer/odex-js), integrating
 * the same ODE between events with rtol = atol = 1e-13 and restarting at every event and output time.
 * State [depot, A1, A2]; rhs(y, rate) gives dy/dt for the given infusion rate.
 */
function odexProfile(
  rhs: (y: number[], rate: number) => number[],
  events: { time: number; bolus?: number; depot?: number; rate: number }[],
  times: number[],
  v1: number,
): number[] {
  const solver = new Solver(3);
  solver.relativeTolerance = 1e-13;
  solver.absoluteTolerance = 1e-13;
  solver.maxSteps = 1e6;
  const stops = [...new Set([...events.map((e) => e.time), ...times])].sort((a, b) => a - b);
  let y = [0, 0, 0];
  let rate = 0;
  let t = stops[0] as number;
  const at = new Map<number, number>();
  for (const s of stops) {
    if (s > t) y = solver.solve((_x, yy) => rhs(yy, rate), t, y, s).y.slice(0, 3);
    t = s;
    for (const e of events) {
      if (e.time === s) {
        y = [(y[0] as number) + (e.depot ?? 0), (y[1] as number) + (e.bolus ?? 0), y[2] as number];
        rate = e.rate;
      }
    }
    at.set(s, (y[1] as number) / v1);
  }
  return times.map((x) => at.get(x) as number);
}

describe('integrator/rk4', () => {
  it('rk4Advance(dy = −y, h = 0.1, 10 steps) ≈ e^(−1) with the RK4 local error', () => {
    // Source: Hairer E, Nørsett SP, Wanner G. Solving ODEs I, 1993, §II.1 (classical RK4): R(z) = Σ z^j/j!, j ≤ 4 — from memory
    const y = Float64Array.of(1);
    rk4Advance(
      { dimension: 1, derivative: (a, d) => void (d[0] = -(a[0] as number)) },
      y,
      0.1,
      10,
      createRk4Workspace(1),
    );
    const r = 1 - 0.1 + 0.01 / 2 - 0.001 / 6 + 0.0001 / 24;
    expect(y[0]).toBeCloseTo(r ** 10, 15);
  });

  it('rk4Advance(dy = −λy) keeps 0 < R(−hλ) < 1 for hλ up to the stability limit 2.785', () => {
    // Source: RK4 stability polynomial (Hairer, Nørsett, Wanner 1993, §IV.2) — from memory
    for (const z of [0.05, 0.5, 1, 2, 2.5, 2.78]) {
      const y = Float64Array.of(1);
      rk4Advance(
        { dimension: 1, derivative: (a, d) => void (d[0] = -(a[0] as number)) },
        y,
        z,
        1,
        createRk4Workspace(1),
      );
      expect(y[0]).toBeGreaterThan(0);
      expect(y[0]).toBeLessThan(1);
    }
    const y = Float64Array.of(1);
    rk4Advance(
      { dimension: 1, derivative: (a, d) => void (d[0] = -(a[0] as number)) },
      y,
      2.8,
      1,
      createRk4Workspace(1),
    );
    expect(y[0]).toBeGreaterThan(1); // just past 2.785293563 the step amplifies
    expect(RK4_STABILITY_LIMIT).toBeCloseTo(2.785293563, 9);
  });
});

describe('models/steppers', () => {
  for (const [label, model, params] of [
    ['2-cmt linear with depot', TWO, { CL: 4.8, V1: 30, Q: 7.5, V2: 42, ka: 1.2 }],
    ['1-cmt Michaelis-Menten with depot', MM1, { V1: 45, Vmax: 20, Km: 4.5, ka: 0.6 }],
  ] as const) {
    it(`createStepper(${label}) equals rk4Advance(createSystem(...)) to rounding`, () => {
      const m = resolveModel(model, params, true);
      const sys = createSystem(m);
      sys.rate = 37;
      const a = Float64Array.of(300, 500, 120, 0);
      const b = Float64Array.from(a);
      rk4Advance(sys, a, 0.07, 200, createRk4Workspace(4));
      createStepper(m)(b, 0.07, 200, 37);
      for (let i = 0; i < 4; i++)
        expect(relErr(b[i] as number, a[i] as number)).toBeLessThan(1e-13);
    });
  }
});

describe('simulate vs odex', () => {
  it('simulate(1-cmt Michaelis-Menten, loading infusion + oral doses) agrees with odex to ≤ 1e-6', () => {
    // Source: odex 2.0.4 (Hairer ODEX) reference run of the same ODE, rtol = atol = 1e-13
    const p: PkParameters = { V1: 45, Vmax: 20, Km: 4.5, ka: 0.6, F: 0.9, tlag: 0.5 };
    const doses: Dose[] = [
      { time: 0, amount: 1000, route: 'infusion', duration: 0.75 },
      ...Array.from({ length: 6 }, (_, i) => ({
        time: 8 + 12 * i,
        amount: 150,
        route: 'oral' as const,
      })),
    ];
    const times = grid(0, 96, 0.5);
    const r = simulate({ model: MM1, parameters: p, doses, outputTimes: times });
    const events = [
      { time: 0, rate: 1000 / 0.75 },
      { time: 0.75, rate: 0 },
      ...Array.from({ length: 6 }, (_, i) => ({ time: 8.5 + 12 * i, depot: 135, rate: 0 })),
    ];
    const ref = odexProfile(
      (y, rate) => {
        const c = (y[1] as number) / 45;
        return [-0.6 * (y[0] as number), 0.6 * (y[0] as number) + rate - (20 * c) / (4.5 + c), 0];
      },
      events,
      times,
      45,
    );
    expect(maxRelErr(r.concentrations, ref, 1e-3)).toBeLessThanOrEqual(RK4_REL_TOL);
  });

  it('simulate(2-cmt oral with lag, q12h) agrees with odex to ≤ 1e-6', () => {
    // Source: odex 2.0.4 (Hairer ODEX) reference run of the same ODE, rtol = atol = 1e-13
    const p: PkParameters = { CL: 3.2, V1: 25, Q: 5, V2: 60, ka: 1.4, F: 0.65, tlag: 0.2 };
    const doses = Array.from({ length: 5 }, (_, i) => ({
      time: 12 * i,
      amount: 250,
      route: 'oral' as const,
    }));
    const times = grid(0, 72, 0.25);
    const r = simulate({ model: TWO, parameters: p, doses, outputTimes: times });
    const [k10, k12, k21] = [3.2 / 25, 5 / 25, 5 / 60];
    const ref = odexProfile(
      (y, rate) => {
        const [d, a1, a2] = y as [number, number, number];
        return [-1.4 * d, 1.4 * d + rate - (k10 + k12) * a1 + k21 * a2, k12 * a1 - k21 * a2];
      },
      doses.map((d) => ({ time: d.time + 0.2, depot: 0.65 * 250, rate: 0 })),
      times,
      25,
    );
    expect(maxRelErr(r.concentrations, ref, 1e-3)).toBeLessThanOrEqual(RK4_REL_TOL);
  });
});

describe('simulate with Michaelis-Menten elimination', () => {
  const p: PkParameters = { V1: 50, Vmax: 415 / 24, Km: 5.7 };
  const rate = 12; // mg/h, constant infusion

  it('simulate(MM, constant infusion R < Vmax) approaches Css = Km·R/(Vmax − R)', () => {
    // Source: Winter ME, Basic Clinical Pharmacokinetics, phenytoin chapter (Css = Km·R/(Vmax − R)) — from memory
    const css = michaelisMentenSteadyState(p.Vmax as number, p.Km as number, rate);
    const r = simulate({
      model: MM1,
      parameters: p,
      doses: [{ time: 0, amount: rate * 6000, route: 'infusion', duration: 6000 }],
      outputTimes: [5000],
    });
    expect(relErr(r.concentrations[0] as number, css)).toBeLessThanOrEqual(RK4_REL_TOL);
  });

  it('simulate(MM) reaches 90 % of Css at t90 = Km·V(ln10·Vmax − 0.9R)/(Vmax − R)²', () => {
    // Source: exact integral of the MM ODE; textbook form with 2.3 in Winter ME, Basic Clinical PK — from memory
    const css = michaelisMentenSteadyState(p.Vmax as number, p.Km as number, rate);
    const t90 = michaelisMentenTime90(p.Vmax as number, p.Km as number, 50, rate);
    const r = simulate({
      model: MM1,
      parameters: p,
      doses: [{ time: 0, amount: rate * 2000, route: 'infusion', duration: 2000 }],
      outputTimes: [t90],
    });
    expect(relErr(r.concentrations[0] as number, 0.9 * css)).toBeLessThanOrEqual(RK4_REL_TOL);
  });
});

describe('convergence (observed order of RK4)', () => {
  /** Observed order log2(e(h)/e(h/2)) at a set of times against the closed form. */
  function observedOrders(
    model: ModelStructure,
    params: PkParameters,
    doses: Dose[],
    times: number[],
    h: number,
  ) {
    const exact = closedFormConcentrations(model, params, doses, times);
    const err = (step: number) => {
      const c = simulate({
        model,
        parameters: params,
        doses,
        outputTimes: times,
        options: { maxStep: step, maxRateStep: 1, estimateError: false },
      }).concentrations;
      return Math.max(...c.map((x, i) => Math.abs(x - (exact[i] as number))));
    };
    const e1 = err(h);
    const e2 = err(h / 2);
    const e3 = err(h / 4);
    return [Math.log2(e1 / e2), Math.log2(e2 / e3)];
  }

  it('simulate(1-cmt bolus, h → h/2 → h/4): error falls ≈ 16× per halving (order 4 ± 0.3)', () => {
    // Source: RK4 global error O(h⁴) (Hairer, Nørsett, Wanner 1993, §II.3) — from memory
    for (const q of observedOrders(
      ONE,
      { CL: 6, V1: 40 },
      [{ time: 0, amount: 1000, route: 'bolus' }],
      [12, 24],
      2,
    )) {
      expect(Math.abs(q - 4)).toBeLessThanOrEqual(0.3);
    }
  });

  it('simulate(2-cmt oral q8h, h → h/2 → h/4): order 4 ± 0.3', () => {
    // Source: RK4 global error O(h⁴) (Hairer, Nørsett, Wanner 1993, §II.3) — from memory
    // Every segment is a multiple of 0.8 h so each halving halves every step exactly.
    const doses = [0, 8, 16].map((t) => ({ time: t, amount: 300, route: 'oral' as const }));
    const p = { CL: 4.8, V1: 30, Q: 7.5, V2: 42, ka: 1.1, tlag: 0.8 };
    for (const q of observedOrders(TWO, p, doses, [6.4, 20, 30.4], 0.2)) {
      expect(Math.abs(q - 4)).toBeLessThanOrEqual(0.3);
    }
  });

  it('simulate(2-cmt infusions, h → h/2 → h/4): order 4 ± 0.3 (steps land on infusion ends)', () => {
    // Source: RK4 global error O(h⁴) with event-aligned steps (Hairer, Nørsett, Wanner 1993, §II.3) — from memory
    // Every segment is a multiple of 1.2 h so each halving halves every step exactly.
    const doses = [0, 12].map((t) => ({
      time: t,
      amount: 1000,
      route: 'infusion' as const,
      duration: 2.4,
    }));
    const p = { CL: 4.8, V1: 30, Q: 7.5, V2: 42 };
    for (const q of observedOrders(TWO, p, doses, [6, 18, 30], 0.3)) {
      expect(Math.abs(q - 4)).toBeLessThanOrEqual(0.3);
    }
  });

  it('simulate(...).errorEstimate tracks the true error (within a factor 3 on sparse output)', () => {
    // Source: step-doubling (Richardson) estimate (y_{h/2} − y_h)/(2⁴ − 1) (Hairer, Nørsett, Wanner 1993, §II.4) — from memory
    const doses: Dose[] = [{ time: 0, amount: 1000, route: 'bolus' }];
    const times = grid(0, 24, 4);
    const r = simulate({
      model: ONE,
      parameters: { CL: 6, V1: 40 },
      doses,
      outputTimes: times,
      options: { maxStep: 0.5, maxRateStep: 1 },
    });
    const exact = closedFormConcentrations(ONE, { CL: 6, V1: 40 }, doses, times);
    const trueErr = Math.max(...r.concentrations.map((c, i) => Math.abs(c - (exact[i] as number))));
    const est = r.errorEstimate as number;
    expect(est / trueErr).toBeGreaterThan(1 / 3);
    expect(est / trueErr).toBeLessThan(3);
  });
});

describe('stability: no oscillation, negativity or overshoot at any requested step', () => {
  it('simulate(k = 40 /h, maxStep 24 h, output every 6 h) gives a monotone, non-negative decay', () => {
    // Source: RK4 stability polynomial 0 < R(−hλ) < 1 for hλ < 2.785 (Hairer & Wanner, Solving ODEs II, §IV.2) — from memory
    const r = simulate({
      model: ONE,
      parameters: { CL: 400, V1: 10 },
      doses: [{ time: 0, amount: 500, route: 'bolus' }],
      outputTimes: grid(0, 48, 6),
      options: { maxStep: 24 },
    });
    expect(r.stepSize * 40).toBeLessThanOrEqual(0.05 + 1e-12);
    for (let i = 1; i < r.concentrations.length; i++) {
      const c = r.concentrations[i] as number;
      expect(c).toBeGreaterThanOrEqual(0);
      expect(c).toBeLessThanOrEqual(r.concentrations[i - 1] as number);
    }
  });

  it('simulate(very fast distribution and absorption, output every 12 h) never goes negative', () => {
    const r = simulate({
      model: TWO,
      parameters: { CL: 5, V1: 2, Q: 300, V2: 40, ka: 60 },
      doses: [
        { time: 0, amount: 500, route: 'oral' },
        { time: 24, amount: 500, route: 'bolus' },
      ],
      outputTimes: grid(0, 96, 12),
      options: { maxStep: 12, maxRateStep: 1 },
    });
    for (const c of r.concentrations) expect(c).toBeGreaterThanOrEqual(0);
    const exact = closedFormConcentrations(
      TWO,
      { CL: 5, V1: 2, Q: 300, V2: 40, ka: 60 },
      [
        { time: 0, amount: 500, route: 'oral' },
        { time: 24, amount: 500, route: 'bolus' },
      ],
      grid(0, 96, 12),
    );
    // Even at the loosest allowed h·λ = 1 the curve stays close to the exact one.
    expect(maxRelErr(r.concentrations, exact, 1e-6)).toBeLessThan(0.05);
  });

  it('simulate(constant infusion) approaches Css = R/CL from below and never crosses it', () => {
    // Source: Gibaldi & Perrier 1982, ch. 1 (Css = R0/CL for a continuous infusion) — from memory
    for (const [cl, v, maxStep] of [
      [5, 50, 100],
      [500, 5, 50],
      [50, 0.5, 1000],
    ] as const) {
      const css = 100 / cl;
      const r = simulate({
        model: ONE,
        parameters: { CL: cl, V1: v },
        doses: [{ time: 0, amount: 100 * 400, route: 'infusion', duration: 400 }],
        outputTimes: grid(0, 399, 0.5),
        options: { maxStep, maxRateStep: 1 },
      });
      for (let i = 1; i < r.concentrations.length; i++) {
        const c = r.concentrations[i] as number;
        expect(c).toBeLessThanOrEqual(css);
        expect(c).toBeGreaterThanOrEqual(r.concentrations[i - 1] as number);
      }
    }
  });

  it('simulate(Michaelis-Menten with a tiny Km, maxStep 24 h) decays monotonically to ~0 without going negative', () => {
    const r = simulate({
      model: MM1,
      parameters: { V1: 10, Vmax: 200, Km: 0.05 },
      doses: [{ time: 0, amount: 300, route: 'bolus' }],
      outputTimes: grid(0, 24, 0.25),
      options: { maxStep: 24 },
    });
    for (let i = 1; i < r.concentrations.length; i++) {
      const c = r.concentrations[i] as number;
      expect(c).toBeGreaterThanOrEqual(0);
      expect(c).toBeLessThanOrEqual(r.concentrations[i - 1] as number);
    }
  });
});
