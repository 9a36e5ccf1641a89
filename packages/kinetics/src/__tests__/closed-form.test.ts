import { describe, expect, it } from 'vitest';
import {
  closedFormAuc,
  closedFormConcentrations,
  closedFormSteadyState,
  closedFormSteadyStateAuc,
} from '../closed-form/linear';
import {
  michaelisMentenRateForTarget,
  michaelisMentenSteadyState,
  michaelisMentenTime90,
  michaelisMentenWashoutTime,
} from '../closed-form/michaelis-menten';
import { EngineError } from '../errors';
import { macroRateConstants } from '../models/parameters';
import type { ModelStructure } from '../types';
import { relErr } from './helpers';

const ONE: ModelStructure = { compartments: 1, elimination: 'linear' };
const TWO: ModelStructure = { compartments: 2, elimination: 'linear' };
/** The closed forms are evaluated in double precision; two algebraic forms agree to this. */
const ALGEBRA_TOL = 1e-12;

describe('closed-form/linear', () => {
  it('closedFormConcentrations(1-cmt bolus) = (D/V)e^(−kt)', () => {
    // Source: Gibaldi M, Perrier D. Pharmacokinetics, 2nd ed., 1982, ch. 1 (one-compartment bolus) — from memory
    const [c] = closedFormConcentrations(
      ONE,
      { CL: 5, V1: 50 },
      [{ time: 0, amount: 1000, route: 'bolus' }],
      [12],
    );
    expect(relErr(c as number, 20 * Math.exp(-1.2))).toBeLessThan(ALGEBRA_TOL);
  });

  it('closedFormConcentrations(1-cmt infusion) during and after: (R0/CL)(1 − e^(−kt)), ×e^(−k(t−T))', () => {
    // Source: Gibaldi & Perrier 1982, ch. 1; Rowland M, Tozer TN, Clinical Pharmacokinetics (zero-order infusion) — from memory
    const k = 4 / 50;
    const r0 = 1000;
    const cs = closedFormConcentrations(
      ONE,
      { CL: 4, V1: 50 },
      [{ time: 0, amount: 1000, route: 'infusion', duration: 1 }],
      [0.5, 12],
    );
    expect(relErr(cs[0] as number, (r0 / 4) * (1 - Math.exp(-k * 0.5)))).toBeLessThan(ALGEBRA_TOL);
    expect(relErr(cs[1] as number, (r0 / 4) * (1 - Math.exp(-k)) * Math.exp(-k * 11))).toBeLessThan(
      ALGEBRA_TOL,
    );
  });

  it('closedFormConcentrations(1-cmt oral) is the Bateman function with lag, and its ka = k limit', () => {
    // Source: Bateman H. Proc Cambridge Philos Soc 1910;15:423; Gibaldi & Perrier 1982, ch. 1 — from memory
    const p = { CL: 6, V1: 60, ka: 1.1, F: 0.8, tlag: 0.5 };
    const k = 0.1;
    const t = 3.5 - 0.5;
    const [c, before] = closedFormConcentrations(
      ONE,
      p,
      [{ time: 0, amount: 500, route: 'oral' }],
      [3.5, 0.4],
    );
    const bateman =
      ((0.8 * 500 * 1.1) / (60 * (1.1 - k))) * (Math.exp(-k * t) - Math.exp(-1.1 * t));
    expect(relErr(c as number, bateman)).toBeLessThan(ALGEBRA_TOL);
    expect(before).toBe(0);
    // ka = k: C = (F·D·k/V)·t·e^(−kt)
    const [cl] = closedFormConcentrations(
      ONE,
      { ...p, ka: k },
      [{ time: 0, amount: 500, route: 'oral' }],
      [3.5],
    );
    expect(relErr(cl as number, ((0.8 * 500 * k) / 60) * t * Math.exp(-k * t))).toBeLessThan(
      ALGEBRA_TOL,
    );
  });

  it('macroRateConstants(k10, k12, k21): α·β = k10·k21, α + β = k10 + k12 + k21', () => {
    // Source: Gibaldi & Perrier 1982, ch. 2 (hybrid rate constants) — from memory
    const [a, b] = macroRateConstants(0.16, 0.25, 7.5 / 42);
    expect(relErr(a * b, 0.16 * (7.5 / 42))).toBeLessThan(ALGEBRA_TOL);
    expect(relErr(a + b, 0.16 + 0.25 + 7.5 / 42)).toBeLessThan(ALGEBRA_TOL);
  });

  it('closedFormConcentrations(2-cmt bolus) = A·e^(−αt) + B·e^(−βt) with A + B = D/V1', () => {
    // Source: Gibaldi & Perrier 1982, ch. 2 (two-compartment bolus) — from memory
    const p = { CL: 4.8, V1: 30, Q: 7.5, V2: 42 };
    const k21 = 7.5 / 42;
    const [al, be] = macroRateConstants(4.8 / 30, 7.5 / 30, k21);
    const A = ((1000 / 30) * (al - k21)) / (al - be);
    const B = ((1000 / 30) * (k21 - be)) / (al - be);
    expect(relErr(A + B, 1000 / 30)).toBeLessThan(ALGEBRA_TOL);
    const [c0, c6] = closedFormConcentrations(
      TWO,
      p,
      [{ time: 0, amount: 1000, route: 'bolus' }],
      [0, 6],
    );
    expect(relErr(c0 as number, 1000 / 30)).toBeLessThan(ALGEBRA_TOL);
    expect(relErr(c6 as number, A * Math.exp(-al * 6) + B * Math.exp(-be * 6))).toBeLessThan(
      ALGEBRA_TOL,
    );
    // AUC = A/α + B/β = D/CL
    expect(relErr(A / al + B / be, 1000 / 4.8)).toBeLessThan(ALGEBRA_TOL);
  });

  it('closedFormConcentrations(2-cmt infusion) matches Cα, Cβ form during and after the infusion', () => {
    // Source: Gibaldi & Perrier 1982, ch. 2 (two-compartment zero-order infusion) — from memory
    const p = { CL: 4.8, V1: 30, Q: 7.5, V2: 42 };
    const k21 = 7.5 / 42;
    const [al, be] = macroRateConstants(4.8 / 30, 7.5 / 30, k21);
    const r0 = 1200 / 2;
    const ca = ((r0 / 30) * (al - k21)) / (al * (al - be));
    const cb = ((r0 / 30) * (k21 - be)) / (be * (al - be));
    const cs = closedFormConcentrations(
      TWO,
      p,
      [{ time: 0, amount: 1200, route: 'infusion', duration: 2 }],
      [1, 9],
    );
    expect(
      relErr(cs[0] as number, ca * (1 - Math.exp(-al)) + cb * (1 - Math.exp(-be))),
    ).toBeLessThan(ALGEBRA_TOL);
    const after =
      ca * (1 - Math.exp(-al * 2)) * Math.exp(-al * 7) +
      cb * (1 - Math.exp(-be * 2)) * Math.exp(-be * 7);
    expect(relErr(cs[1] as number, after)).toBeLessThan(ALGEBRA_TOL);
  });

  it('closedFormSteadyState(1-cmt infusion, τ) gives Sawchuk–Zaske Cmax,ss and Cmin,ss', () => {
    // Source: Sawchuk RJ, Zaske DE. J Pharmacokinet Biopharm 1976;4:183 (as in Bauer, Applied Clinical PK, ch. 4) — from memory
    const k = 3.5 / 60;
    const r0 = 750;
    const cmax = (r0 / 3.5) * ((1 - Math.exp(-k)) / (1 - Math.exp(-k * 8)));
    const cmin = cmax * Math.exp(-k * 7);
    const dose = { amount: 750, route: 'infusion' as const, duration: 1 };
    expect(relErr(closedFormSteadyState(ONE, { CL: 3.5, V1: 60 }, dose, 8, 1), cmax)).toBeLessThan(
      1e-12,
    );
    expect(relErr(closedFormSteadyState(ONE, { CL: 3.5, V1: 60 }, dose, 8, 0), cmin)).toBeLessThan(
      1e-12,
    );
  });

  it('closedFormSteadyState(1-cmt bolus, τ) = (D/V)e^(−kt)/(1 − e^(−kτ)); oral form of A4', () => {
    // Source: Gibaldi & Perrier 1982, ch. 3 (accumulation factor; oral steady state) — from memory
    const p = { CL: 5, V1: 50 };
    expect(
      relErr(
        closedFormSteadyState(ONE, p, { amount: 1000, route: 'bolus' }, 12, 3),
        (20 * Math.exp(-0.3)) / (1 - Math.exp(-1.2)),
      ),
    ).toBeLessThan(1e-12);
    const po = { ...p, ka: 1.2, F: 0.9 };
    const k = 0.1;
    const t = 2;
    const expected =
      ((0.9 * 400 * 1.2) / (50 * (1.2 - k))) *
      (Math.exp(-k * t) / (1 - Math.exp(-k * 12)) - Math.exp(-1.2 * t) / (1 - Math.exp(-1.2 * 12)));
    expect(
      relErr(closedFormSteadyState(ONE, po, { amount: 400, route: 'oral' }, 12, t), expected),
    ).toBeLessThan(1e-12);
  });

  it('closedFormSteadyStateAuc(dose) = F·D/CL for 1- and 2-cmt, any route', () => {
    // Source: Gibaldi & Perrier 1982, ch. 3 (AUCτ,ss = F·D/CL for linear PK) — from memory
    const p2 = { CL: 4.8, V1: 30, Q: 7.5, V2: 42, ka: 0.9, F: 0.7, tlag: 0.3 };
    expect(
      relErr(closedFormSteadyStateAuc(TWO, p2, { amount: 300, route: 'oral' }), (0.7 * 300) / 4.8),
    ).toBeLessThan(1e-12);
    expect(
      relErr(
        closedFormSteadyStateAuc(
          ONE,
          { CL: 5, V1: 50 },
          { amount: 1000, route: 'infusion', duration: 2 },
        ),
        200,
      ),
    ).toBeLessThan(1e-12);
  });

  it('closedFormAuc(1-cmt bolus, 0, t) = (D/CL)(1 − e^(−kt))', () => {
    // Source: Gibaldi & Perrier 1982, ch. 1 — from memory
    const auc = closedFormAuc(
      ONE,
      { CL: 5, V1: 50 },
      [{ time: 0, amount: 1000, route: 'bolus' }],
      0,
      12,
    );
    expect(relErr(auc, 200 * (1 - Math.exp(-1.2)))).toBeLessThan(1e-12);
  });

  it('closedFormConcentrations(Michaelis-Menten model) throws EngineError("unsupported")', () => {
    expect(() =>
      closedFormConcentrations(
        { compartments: 1, elimination: 'michaelis-menten' },
        { V1: 50, Vmax: 17, Km: 5 },
        [],
        [1],
      ),
    ).toThrowError(EngineError);
  });
});

describe('closed-form/michaelis-menten', () => {
  it('michaelisMentenSteadyState(Vmax, Km, R) = Km·R/(Vmax − R) and its inverse', () => {
    // Source: Winter ME, Basic Clinical Pharmacokinetics, phenytoin chapter; Bauer ch. 10 — from memory
    const css = michaelisMentenSteadyState(415, 5.7, 300);
    expect(relErr(css, (5.7 * 300) / 115)).toBeLessThan(1e-14);
    expect(relErr(michaelisMentenRateForTarget(415, 5.7, css), 300)).toBeLessThan(1e-14);
  });

  it('michaelisMentenSteadyState(R ≥ Vmax) throws EngineError("no-steady-state")', () => {
    expect(() => michaelisMentenSteadyState(415, 5.7, 415)).toThrowError(/no steady state/);
    try {
      michaelisMentenSteadyState(415, 5.7, 500);
    } catch (e) {
      expect((e as EngineError).code).toBe('no-steady-state');
    }
  });

  it('michaelisMentenTime90 uses ln 10 (exact) in place of the textbook 2.3', () => {
    // Source: exact integral of the MM ODE (derived); textbook form Winter/Bauer with 2.3 — from memory
    const t = michaelisMentenTime90(17, 5, 50, 10);
    const textbook = (5 * 50 * (2.3 * 17 - 0.9 * 10)) / (7 * 7);
    // 2.3 vs ln 10 = 2.302585 differs by ≈ 0.1 %, so the two agree to 0.2 %.
    expect(relErr(t, textbook)).toBeLessThan(2e-3);
  });

  it('michaelisMentenWashoutTime(Vmax, Km, V, c0, c) = (V/Vmax)[(c0 − c) + Km ln(c0/c)]', () => {
    // Source: Winter ME, Basic Clinical Pharmacokinetics, phenytoin chapter — from memory
    expect(michaelisMentenWashoutTime(17, 5, 50, 20, 10)).toBeCloseTo(
      (50 / 17) * (10 + 5 * Math.log(2)),
      12,
    );
  });
});
