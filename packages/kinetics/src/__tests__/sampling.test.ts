import { describe, expect, it } from 'vitest';
import { fitMap } from '../estimation/map-fit';
import { suggestSamplingTimes } from '../sampling/suggest';
import type { Dose, ModelStructure } from '../types';

const model: ModelStructure = { compartments: 2, elimination: 'linear' };
const parameters = { CL: 4, V1: 30, Q: 6, V2: 40 };
const residualError = { additive: 1, proportional: 0.1 };
const doses: Dose[] = Array.from({ length: 6 }, (_, i) => ({
  time: 12 * i,
  amount: 1000,
  route: 'infusion',
  duration: 1,
}));
// Prior covariance diag(ω²), ω CL 0.3, V1 0.25 (common practice magnitudes).
const prior = {
  estimated: ['CL', 'V1'],
  covarianceEta: [
    [0.09, 0],
    [0, 0.0625],
  ],
};

describe('sampling/suggest suggestSamplingTimes', () => {
  it('names the dose, reports the conventional peak + trough, and every draw shrinks AUC24 uncertainty', () => {
    const r = suggestSamplingTimes({
      model,
      parameters,
      ...prior,
      residualError,
      doses,
      doseIndex: 3,
    });
    // Before any level SD(ln AUC24) = ω_CL (AUC24,ss = daily dose/CL).
    expect(r.currentSdLogAuc24).toBeCloseTo(0.3, 6);
    const [peak, trough] = r.conventional.draws;
    expect(peak!.doseIndex).toBe(3);
    expect(peak!.hoursAfterInfusionEnd).toBeCloseTo(1, 12);
    expect(trough!.hoursAfterDoseStart).toBeCloseTo(11.5, 12);
    expect(r.conventional.sdLogAuc24).toBeLessThan(r.currentSdLogAuc24);
    for (const a of r.alternatives) expect(a.reduction).toBeGreaterThan(0);
    expect(r.bestPair.sdLogAuc24).toBeLessThanOrEqual(r.conventional.sdLogAuc24 + 1e-12);
    expect(r.bestPair.sdLogAuc24).toBeLessThanOrEqual(r.bestSingle.sdLogAuc24);
  });

  it('ranks late (trough-side) times above early ones for an AUC (CL) question', () => {
    const r = suggestSamplingTimes({
      model,
      parameters,
      ...prior,
      residualError,
      doses,
      doseIndex: 3,
    });
    expect(r.bestSingle.draws[0]!.hoursAfterDoseStart).toBeGreaterThan(6);
  });

  it('after a fit the remaining uncertainty is smaller and the value of more levels falls', () => {
    const fit = fitMap({
      model,
      prior: { typical: parameters, variability: { CL: 0.3, V1: 0.25 }, residualError },
      doses: doses.slice(0, 4),
      levels: [
        { time: 38, value: 27 },
        { time: 47.5, value: 11 },
      ],
    });
    const r = suggestSamplingTimes({
      model,
      parameters: fit.parameters,
      estimated: fit.estimated,
      covarianceEta: fit.covarianceEta!,
      residualError,
      doses,
      doseIndex: 4,
    });
    expect(r.currentSdLogAuc24).toBeLessThan(0.3);
  });

  it('refuses a dose index with no following dose', () => {
    expect(() =>
      suggestSamplingTimes({ model, parameters, ...prior, residualError, doses, doseIndex: 5 }),
    ).toThrow(/followed by another dose/);
  });
});
