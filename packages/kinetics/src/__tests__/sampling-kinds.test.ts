import { describe, expect, it } from 'vitest';
import { suggestSamplingTimes } from '../sampling/suggest';
import { suggestSteadyStateTrough } from '../sampling/steady-state-trough';
import { simulate } from '../simulate';
import type { Dose, ModelStructure, PkParameters } from '../types';
import { relErr } from './helpers';

describe('sampling/suggest suggestSamplingTimes (oral doses)', () => {
  const ONE: ModelStructure = { compartments: 1, elimination: 'linear' };
  const p: PkParameters = { CL: 5, V1: 50, ka: 1.1, F: 0.8, tlag: 0.5 };
  const doses: Dose[] = Array.from({ length: 8 }, (_, i) => ({
    time: 12 * i,
    amount: 500,
    route: 'oral',
  }));

  it('the conventional pair is the peak at tmax,ss (A4) and the pre-dose trough', () => {
    // Source: Gibaldi & Perrier, Pharmacokinetics 2nd ed. 1982, ch. 3 — pk-reference A4:
    // tmax,ss = tlag + ln[ka(1 − e^(−kτ))/(k(1 − e^(−ka τ)))]/(ka − k)
    const r = suggestSamplingTimes({
      model: ONE,
      parameters: p,
      estimated: ['CL', 'V1', 'ka'],
      covarianceEta: [
        [0.09, 0, 0],
        [0, 0.0625, 0],
        [0, 0, 0.25],
      ],
      residualError: { additive: 0.5, proportional: 0.1 },
      doses,
      doseIndex: 6,
    });
    const k = 0.1;
    const ka = 1.1;
    const tmax =
      0.5 + Math.log((ka * (1 - Math.exp(-k * 12))) / (k * (1 - Math.exp(-ka * 12)))) / (ka - k);
    const [peak, trough] = r.conventional.draws;
    expect(peak!.hoursAfterDoseStart).toBeCloseTo(tmax, 10);
    expect(trough!.hoursAfterDoseStart).toBeCloseTo(11.5, 12);
    expect(r.conventional.sdLogAuc24).toBeLessThan(r.currentSdLogAuc24);
    expect(r.warnings.map((w) => w.code)).toContain('oral-peak-at-tmax-ss');
    // Predictions at the draws equal RK4 of the dose list.
    const sim = simulate({
      model: ONE,
      parameters: p,
      doses,
      outputTimes: [peak!.time, trough!.time],
    });
    expect(relErr(peak!.predicted, sim.concentrations[0]!)).toBeLessThan(1e-6);
    expect(relErr(trough!.predicted, sim.concentrations[1]!)).toBeLessThan(1e-6);
  });
});

describe('sampling/steady-state-trough suggestSteadyStateTrough (phenytoin)', () => {
  const MM1: ModelStructure = { compartments: 1, elimination: 'michaelis-menten' };
  const p: PkParameters = { V1: 49, Vmax: 415 / 24, Km: 5.7, ka: 0.3, F: 0.859 };

  it('draws the trough before the first dose at or after t90, and states t90 (A8)', () => {
    // Source: Winter ME, Basic Clinical Pharmacokinetics, phenytoin chapter (from memory) — pk-reference A8:
    // t90 = Km·V·(ln10·Vmax − 0.9·R)/(Vmax − R)², R = S·F·dose/τ
    const r = suggestSteadyStateTrough({
      model: MM1,
      parameters: p,
      regimen: { amount: 150, interval: 12, route: 'oral', start: 8 },
      saltFactor: 0.92,
    });
    if (r.outcome !== 'draw') throw new Error('expected a draw');
    const R = (0.92 * 0.859 * 150) / 12;
    const t90 = (5.7 * 49 * (Math.LN10 * p.Vmax! - 0.9 * R)) / (p.Vmax! - R) ** 2;
    expect(relErr(r.time90Hours, t90)).toBeLessThan(1e-12);
    expect(r.time90Days).toBeCloseTo(t90 / 24, 12);
    const n = Math.ceil(t90 / 12);
    expect(r.draw.beforeDoseNumber).toBe(n);
    expect(r.draw.beforeDoseTime).toBe(8 + 12 * n);
    expect(r.draw.time).toBe(8 + 12 * n - 0.5);
    expect(r.draw.hoursFromStart).toBeGreaterThanOrEqual(t90 - 0.5);
    // The level there is close to (not yet exactly) the steady-state trough.
    expect(r.fractionOfSteadyStateTrough).toBeGreaterThan(0.85);
    expect(r.fractionOfSteadyStateTrough).toBeLessThan(1);
    expect(r.warnings.map((w) => w.code)).toContain('t90-from-no-drug');
  });

  it('R ≥ Vmax: no draw, a no-steady-state outcome with the reason', () => {
    const r = suggestSteadyStateTrough({
      model: MM1,
      parameters: p,
      regimen: { amount: 500, interval: 12, infusionDuration: 0.5, route: 'infusion' },
      saltFactor: 0.92,
    });
    expect(r.outcome).toBe('no-steady-state');
    expect(r.warnings[0]!.message).toMatch(/Vmax/);
  });
});
