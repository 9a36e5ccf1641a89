import { describe, expect, it } from 'vitest';
import { closedFormSteadyState } from '../closed-form/linear';
import { michaelisMentenSteadyState } from '../closed-form/michaelis-menten';
import { EngineError } from '../errors';
import {
  accumulationFactor,
  auc24,
  dosingIntervalMetrics,
  halfLives,
  steadyStateMetrics,
  steadyStateProgress,
  timeAboveThreshold,
} from '../metrics/metrics';
import type { ModelStructure } from '../types';
import { relErr, RK4_REL_TOL } from './helpers';

const ONE: ModelStructure = { compartments: 1, elimination: 'linear' };
const TWO: ModelStructure = { compartments: 2, elimination: 'linear' };
const MM1: ModelStructure = { compartments: 1, elimination: 'michaelis-menten' };

describe('metrics', () => {
  it('halfLives(1-cmt) = ln2·V/CL; accumulationFactor = 1/(1 − e^(−kτ))', () => {
    // Source: Gibaldi M, Perrier D. Pharmacokinetics, 2nd ed., 1982, ch. 1 and 3 — from memory
    expect(halfLives(ONE, { CL: 5, V1: 50 }).terminal).toBeCloseTo(Math.LN2 * 10, 12);
    expect(accumulationFactor(ONE, { CL: 5, V1: 50 }, 12)).toBeCloseTo(
      1 / (1 - Math.exp(-1.2)),
      12,
    );
    const h2 = halfLives(TWO, { CL: 4.8, V1: 30, Q: 7.5, V2: 42 });
    expect(h2.distribution as number).toBeLessThan(h2.terminal);
  });

  it('halfLives(Michaelis-Menten) throws EngineError("unsupported")', () => {
    expect(() => halfLives(MM1, { V1: 50, Vmax: 17, Km: 5 })).toThrowError(EngineError);
  });

  it('steadyStateProgress(after 5 half-lives) = 96.875 %, reached', () => {
    // Source: 1 − 2^(−n) (Gibaldi & Perrier 1982, ch. 3) — from memory; 5 half-lives rule — common practice
    const p = steadyStateProgress(ONE, { CL: 5, V1: 50 }, 5 * Math.LN2 * 10);
    expect(p.fractionOfSteadyState).toBeCloseTo(0.96875, 12);
    expect(p.reached).toBe(true);
  });

  it('dosingIntervalMetrics(q12h infusions) gives peaks at infusion end, troughs before the next dose', () => {
    // Source: Sawchuk RJ, Zaske DE, J Pharmacokinet Biopharm 1976;4:183 (Cmax at the end of infusion) — from memory
    const doses = [0, 12, 24].map((t) => ({
      time: t,
      amount: 1000,
      route: 'infusion' as const,
      duration: 1,
    }));
    const iv = dosingIntervalMetrics({ model: ONE, parameters: { CL: 4, V1: 50 }, doses });
    expect(iv).toHaveLength(3);
    const k = 0.08;
    const cmax1 = (1000 / 4) * (1 - Math.exp(-k));
    expect(relErr(iv[0]?.peak as number, cmax1)).toBeLessThan(RK4_REL_TOL);
    expect(iv[0]?.peakTime).toBeCloseTo(1, 9);
    expect(relErr(iv[0]?.trough as number, cmax1 * Math.exp(-k * 11))).toBeLessThan(RK4_REL_TOL);
  });

  it('dosingIntervalMetrics(q8h bolus) trough excludes the bolus given at the end of the interval', () => {
    const doses = [0, 8].map((t) => ({ time: t, amount: 500, route: 'bolus' as const }));
    const iv = dosingIntervalMetrics({ model: ONE, parameters: { CL: 5, V1: 50 }, doses });
    expect(relErr(iv[0]?.trough as number, 10 * Math.exp(-0.8))).toBeLessThan(RK4_REL_TOL);
    expect(relErr(iv[1]?.peak as number, 10 + 10 * Math.exp(-0.8))).toBeLessThan(RK4_REL_TOL);
  });

  it('steadyStateMetrics(2-cmt, q12h) matches the closed-form steady state and AUCτ = D/CL', () => {
    // Source: Gibaldi & Perrier 1982, ch. 2–3 (steady state; AUCτ,ss = F·D/CL) — from memory
    const p = { CL: 4.8, V1: 30, Q: 7.5, V2: 42 };
    const dose = { amount: 1000, route: 'infusion' as const, duration: 1 };
    const ss = steadyStateMetrics(TWO, p, dose, 12);
    expect(ss.converged).toBe(true);
    expect(relErr(ss.aucTau, 1000 / 4.8)).toBeLessThan(RK4_REL_TOL);
    expect(relErr(ss.auc24, 2000 / 4.8)).toBeLessThan(RK4_REL_TOL);
    expect(relErr(ss.trough, closedFormSteadyState(TWO, p, dose, 12, 0))).toBeLessThan(RK4_REL_TOL);
    expect(relErr(ss.peak, closedFormSteadyState(TWO, p, dose, 12, 1))).toBeLessThan(RK4_REL_TOL);
  });

  it('steadyStateMetrics(Michaelis-Menten, frequent doses) averages near Km·R/(Vmax − R); R ≥ Vmax throws', () => {
    // Source: Winter ME, Basic Clinical Pharmacokinetics, phenytoin chapter (Css = Km·R/(Vmax − R)) — from memory
    const p = { V1: 50, Vmax: 415 / 24, Km: 5.7 };
    const ss = steadyStateMetrics(MM1, p, { amount: 12, route: 'infusion', duration: 1 }, 1);
    expect(ss.converged).toBe(true);
    expect(relErr(ss.aucTau, michaelisMentenSteadyState(415 / 24, 5.7, 12))).toBeLessThan(1e-5);
    expect(() => steadyStateMetrics(MM1, p, { amount: 450, route: 'bolus' }, 24)).toThrowError(
      /no steady state/,
    );
  });

  it('timeAboveThreshold(bolus, C0 = 20, k = 0.1, threshold 10) = ln2/k', () => {
    // Source: Gibaldi & Perrier 1982, ch. 1 (C falls to half in ln2/k) — from memory
    const t = timeAboveThreshold(
      {
        model: ONE,
        parameters: { CL: 5, V1: 50 },
        doses: [{ time: 0, amount: 1000, route: 'bolus' }],
      },
      10,
      0,
      24,
    );
    expect(t.above).toBeCloseTo(Math.LN2 * 10, 3);
    expect(t.above + t.below).toBeCloseTo(24, 12);
  });

  it('auc24(q12h regimen at steady state, day start) = daily dose/CL', () => {
    // Source: Gibaldi & Perrier 1982, ch. 3 (AUC24,ss = daily dose/CL) — from memory
    const doses = Array.from({ length: 30 }, (_, i) => ({
      time: 12 * i,
      amount: 1000,
      route: 'infusion' as const,
      duration: 1,
    }));
    expect(
      relErr(auc24({ model: ONE, parameters: { CL: 4, V1: 50 }, doses }, 336), 500),
    ).toBeLessThan(RK4_REL_TOL);
  });
});
