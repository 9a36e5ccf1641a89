import { describe, expect, it } from 'vitest';
import { closedFormConcentrations, closedFormSteadyState } from '../closed-form/linear';
import { EngineError } from '../errors';
import { simulate, concentrationsAt, defaultSimulateOptions } from '../simulate';
import type { Dose, ModelStructure, PkParameters } from '../types';
import { grid, maxRelErr, relErr, RK4_REL_TOL } from './helpers';

const ONE: ModelStructure = { compartments: 1, elimination: 'linear' };
const TWO: ModelStructure = { compartments: 2, elimination: 'linear' };

// Invented parameter sets (not from any published case).
const P1: PkParameters = { CL: 4.2, V1: 55 };
const P1_ORAL: PkParameters = { CL: 6.1, V1: 48, ka: 1.3, F: 0.85, tlag: 0.4 };
const P2: PkParameters = { CL: 4.8, V1: 30, Q: 7.5, V2: 42 };
const P2_ORAL: PkParameters = { ...P2, ka: 0.9, F: 0.7, tlag: 0.25 };

interface Case {
  name: string;
  model: ModelStructure;
  parameters: PkParameters;
  doses: Dose[];
  times: number[];
}

const cases: Case[] = [
  {
    // Source: Gibaldi M, Perrier D. Pharmacokinetics, 2nd ed., 1982, ch. 1 (one-compartment bolus) — from memory
    name: 'one-compartment IV bolus',
    model: ONE,
    parameters: P1,
    doses: [{ time: 0, amount: 1200, route: 'bolus' }],
    times: grid(0, 48, 0.5),
  },
  {
    // Source: Gibaldi & Perrier 1982, ch. 1 (zero-order infusion, during and after) — from memory
    name: 'one-compartment 1.5 h infusion',
    model: ONE,
    parameters: { CL: 3.6, V1: 62 },
    doses: [{ time: 0, amount: 1500, route: 'infusion', duration: 1.5 }],
    times: grid(0, 36, 0.3),
  },
  {
    // Source: Bateman H. Proc Cambridge Philos Soc 1910;15:423; Gibaldi & Perrier ch. 1 (first-order absorption with lag) — from memory
    name: 'one-compartment oral with lag',
    model: ONE,
    parameters: P1_ORAL,
    doses: [{ time: 0, amount: 400, route: 'oral' }],
    times: grid(0, 30, 0.2),
  },
  {
    // Source: Gibaldi & Perrier 1982, ch. 2 (two-compartment bolus, A·e^(−αt) + B·e^(−βt)) — from memory
    name: 'two-compartment IV bolus',
    model: TWO,
    parameters: P2,
    doses: [{ time: 0, amount: 1000, route: 'bolus' }],
    times: grid(0, 48, 0.25),
  },
  {
    // Source: Gibaldi & Perrier 1982, ch. 2–3 (two-compartment infusion, superposition of repeated doses) — from memory
    name: 'two-compartment q12h 1 h infusions × 6',
    model: TWO,
    parameters: P2,
    doses: Array.from({ length: 6 }, (_, i) => ({
      time: 12 * i,
      amount: 1250,
      route: 'infusion' as const,
      duration: 1,
    })),
    times: grid(0, 96, 0.1),
  },
  {
    // Source: Gibaldi & Perrier 1982, ch. 2 (two-compartment first-order absorption) — from memory
    name: 'two-compartment oral with lag, q8h × 4',
    model: TWO,
    parameters: P2_ORAL,
    doses: Array.from({ length: 4 }, (_, i) => ({
      time: 8 * i,
      amount: 300,
      route: 'oral' as const,
    })),
    times: grid(0, 48, 0.2),
  },
  {
    // Source: superposition principle (Gibaldi & Perrier ch. 3): mixed routes add for a linear system — from memory
    name: 'one-compartment mixed bolus + infusion + oral, uneven times',
    model: ONE,
    parameters: { ...P1, ka: 0.8 },
    doses: [
      { time: 0.37, amount: 500, route: 'bolus' },
      { time: 3.1, amount: 700, route: 'infusion', duration: 2.3 },
      { time: 4.05, amount: 250, route: 'oral' },
    ],
    times: grid(0, 24, 0.13),
  },
];

describe('simulate', () => {
  for (const c of cases) {
    it(`simulate({ ${c.name} }) agrees with the closed form to ≤ 1e-6 relative`, () => {
      const r = simulate({
        model: c.model,
        parameters: c.parameters,
        doses: c.doses,
        outputTimes: c.times,
      });
      const exact = closedFormConcentrations(c.model, c.parameters, c.doses, c.times);
      const peak = Math.max(...exact);
      expect(maxRelErr(r.concentrations, exact, 1e-3 * peak)).toBeLessThanOrEqual(RK4_REL_TOL);
      expect(r.outcome).toBe('completed');
    });
  }

  it('simulate(one-compartment q8h infusion × 40) reaches the closed-form steady state', () => {
    // Source: Sawchuk RJ, Zaske DE. J Pharmacokinet Biopharm 1976;4:183 (intermittent infusion at steady state) — from memory
    const p = { CL: 3.5, V1: 60 };
    const doses = Array.from({ length: 40 }, (_, i) => ({
      time: 8 * i,
      amount: 750,
      route: 'infusion' as const,
      duration: 1,
    }));
    const t0 = 39 * 8;
    const ts = grid(0, 7.9, 0.1);
    const r = simulate({ model: ONE, parameters: p, doses, outputTimes: ts.map((t) => t0 + t) });
    ts.forEach((t, i) => {
      const ss = closedFormSteadyState(
        ONE,
        p,
        { amount: 750, route: 'infusion', duration: 1 },
        8,
        t,
      );
      expect(relErr(r.concentrations[i] as number, ss)).toBeLessThanOrEqual(RK4_REL_TOL);
    });
  });

  it('simulate(two-compartment q12h oral × 40) reaches the closed-form steady state', () => {
    // Source: Gibaldi & Perrier 1982, ch. 3 (steady state by geometric series of each exponential) — from memory
    const doses = Array.from({ length: 40 }, (_, i) => ({
      time: 12 * i,
      amount: 300,
      route: 'oral' as const,
    }));
    const t0 = 39 * 12;
    const ts = grid(0, 11.5, 0.5);
    const r = simulate({
      model: TWO,
      parameters: P2_ORAL,
      doses,
      outputTimes: ts.map((t) => t0 + t),
    });
    ts.forEach((t, i) => {
      const ss = closedFormSteadyState(TWO, P2_ORAL, { amount: 300, route: 'oral' }, 12, t);
      expect(relErr(r.concentrations[i] as number, ss)).toBeLessThanOrEqual(RK4_REL_TOL);
    });
  });

  it('simulate(...).aucs over a steady-state interval equals F·D/CL', () => {
    // Source: Gibaldi & Perrier 1982, ch. 3: AUCτ,ss = F·D/CL for any linear model — from memory
    const doses = Array.from({ length: 40 }, (_, i) => ({
      time: 12 * i,
      amount: 1000,
      route: 'infusion' as const,
      duration: 1.5,
    }));
    const r = simulate({
      model: TWO,
      parameters: P2,
      doses,
      outputTimes: [],
      aucWindows: [[39 * 12, 40 * 12]],
    });
    expect(relErr(r.aucs[0] as number, 1000 / 4.8)).toBeLessThanOrEqual(RK4_REL_TOL);
  });

  it('simulate(one-compartment bolus) conserves mass: V·C(t) + CL·AUC(0,t) = D', () => {
    // Source: mass balance (elimination rate = CL·C) — common practice
    const ts = grid(0, 72, 3);
    const r = simulate({
      model: ONE,
      parameters: P1,
      doses: [{ time: 0, amount: 1200, route: 'bolus' }],
      outputTimes: ts,
    });
    ts.forEach((_, i) => {
      const total = 55 * (r.concentrations[i] as number) + 4.2 * (r.cumulativeAucs[i] as number);
      expect(relErr(total, 1200)).toBeLessThanOrEqual(1e-9);
    });
  });

  it('simulate(two-compartment oral) eliminates F·D in total: CL·AUC(0,∞) = F·D', () => {
    // Source: Gibaldi & Perrier 1982, ch. 1–2: AUC0–∞ = F·D/CL — from memory
    const r = simulate({
      model: TWO,
      parameters: P2_ORAL,
      doses: [{ time: 0, amount: 300, route: 'oral' }],
      outputTimes: [],
      aucWindows: [[0, 800]],
    });
    expect(relErr(4.8 * (r.aucs[0] as number), 0.7 * 300)).toBeLessThanOrEqual(RK4_REL_TOL);
  });

  it('simulate(A ∪ B) = simulate(A) + simulate(B) (superposition)', () => {
    // Source: superposition for linear systems (Gibaldi & Perrier 1982, ch. 3) — from memory
    const a: Dose[] = [{ time: 0, amount: 900, route: 'infusion', duration: 2 }];
    const b: Dose[] = [{ time: 5.5, amount: 300, route: 'oral' }];
    const ts = grid(0, 24, 0.5);
    const ca = concentrationsAt(TWO, P2_ORAL, a, ts);
    const cb = concentrationsAt(TWO, P2_ORAL, b, ts);
    const cab = concentrationsAt(TWO, P2_ORAL, [...a, ...b], ts);
    ts.forEach((_, i) => {
      // The three runs land on different event grids, so they agree to RK4 accuracy, not to rounding.
      expect(relErr(cab[i] as number, (ca[i] as number) + (cb[i] as number))).toBeLessThanOrEqual(
        RK4_REL_TOL,
      );
    });
  });

  it('simulate(bolus at t = 0) reports D/V1 at t = 0 and 0 before the first dose', () => {
    // Source: Gibaldi & Perrier 1982, ch. 1: C(0) = D/V — from memory
    const r = simulate({
      model: ONE,
      parameters: P1,
      doses: [{ time: 0, amount: 1100, route: 'bolus' }],
      outputTimes: [-1, 0],
    });
    expect(r.concentrations).toEqual([0, 20]);
  });

  it('simulate(zero dose) gives zero concentrations and AUC', () => {
    const r = simulate({
      model: TWO,
      parameters: P2,
      doses: [{ time: 0, amount: 0, route: 'infusion', duration: 1 }],
      outputTimes: [0, 1, 10],
      aucWindows: [[0, 10]],
    });
    expect(r.concentrations).toEqual([0, 0, 0]);
    expect(r.aucs).toEqual([0]);
  });

  it('simulate(...) returns outputs in the requested order, duplicates included', () => {
    const doses: Dose[] = [{ time: 0, amount: 1200, route: 'bolus' }];
    const r = simulate({ model: ONE, parameters: P1, doses, outputTimes: [12, 3, 12] });
    const e = closedFormConcentrations(ONE, P1, doses, [12, 3, 12]);
    expect(r.times).toEqual([12, 3, 12]);
    r.concentrations.forEach((c, i) => expect(relErr(c, e[i] as number)).toBeLessThan(RK4_REL_TOL));
  });

  it('simulate(input) does not mutate its input', () => {
    const input = {
      model: ONE,
      parameters: { ...P1 },
      doses: [{ time: 2, amount: 1000, route: 'bolus' as const }],
      outputTimes: [5, 1],
      aucWindows: [[0, 5] as [number, number]],
    };
    const copy = structuredClone(input);
    simulate(input);
    expect(input).toEqual(copy);
    expect(Object.isFrozen(defaultSimulateOptions)).toBe(true);
  });

  describe('refuses bad input with an EngineError naming the field', () => {
    const base = {
      model: ONE,
      parameters: P1,
      doses: [{ time: 0, amount: 1000, route: 'bolus' as const }],
      outputTimes: [1],
    };
    const bad: [string, object, string][] = [
      ['NaN amount', { doses: [{ time: 0, amount: NaN, route: 'bolus' }] }, 'doses[0].amount'],
      ['negative amount', { doses: [{ time: 0, amount: -5, route: 'bolus' }] }, 'doses[0].amount'],
      [
        'infusion duration 0',
        { doses: [{ time: 0, amount: 5, route: 'infusion', duration: 0 }] },
        'doses[0].duration',
      ],
      ['unknown route', { doses: [{ time: 0, amount: 5, route: 'nasal' }] }, 'doses[0].route'],
      ['NaN dose time', { doses: [{ time: NaN, amount: 5, route: 'bolus' }] }, 'doses[0].time'],
      ['infinite output time', { outputTimes: [1, Infinity] }, 'outputTimes[1]'],
      ['CL ≤ 0', { parameters: { CL: 0, V1: 50 } }, 'parameters.CL'],
      ['V1 NaN', { parameters: { CL: 4, V1: NaN } }, 'parameters.V1'],
      ['two-compartment without Q', { model: TWO }, 'parameters.Q'],
      [
        'Michaelis-Menten without Km',
        {
          model: { compartments: 1, elimination: 'michaelis-menten' },
          parameters: { V1: 50, Vmax: 17 },
        },
        'parameters.Km',
      ],
      ['oral without ka', { doses: [{ time: 0, amount: 5, route: 'oral' }] }, 'parameters.ka'],
      [
        'F > 1',
        { parameters: { ...P1, ka: 1, F: 1.2 }, doses: [{ time: 0, amount: 5, route: 'oral' }] },
        'parameters.F',
      ],
      ['reversed AUC window', { aucWindows: [[5, 1]] }, 'aucWindows[0]'],
      [
        'three compartments',
        { model: { compartments: 3, elimination: 'linear' } },
        'model.compartments',
      ],
      ['maxRateStep beyond 1', { options: { maxRateStep: 2.5 } }, 'options.maxRateStep'],
    ];
    for (const [what, patch, field] of bad) {
      it(`simulate({ ${what} }) throws EngineError(field ${field})`, () => {
        try {
          simulate({ ...base, ...patch } as Parameters<typeof simulate>[0]);
          expect.unreachable();
        } catch (e) {
          expect(e).toBeInstanceOf(EngineError);
          expect((e as EngineError).field).toBe(field);
          expect((e as EngineError).message).toMatch(/^simulate:/);
        }
      });
    }
  });
});
