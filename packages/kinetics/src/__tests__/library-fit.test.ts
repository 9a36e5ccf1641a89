import { describe, expect, it } from 'vitest';
import { fitMap } from '../estimation/map-fit';
import { vancomycinGoti2018 } from '../library/drug-models';
import { populationPriorFromLibrary } from '../library/individual';
import type { Dose } from '../types';

describe('estimation/map-fit with a drug-model library prior', () => {
  it('fitMap accepts populationPriorFromLibrary() and passes its warnings through', () => {
    // CrCl 200 mL/min lies outside the model's covariate range → the prior carries a warning.
    const { prior, warnings } = populationPriorFromLibrary(vancomycinGoti2018, {
      CRCL: 200,
      WT: 80,
      HD: 0,
    });
    const doses: Dose[] = [0, 12, 24].map((t) => ({
      time: t,
      amount: 1250,
      route: 'infusion',
      duration: 1.5,
    }));
    const r = fitMap({
      model: vancomycinGoti2018.structure,
      prior,
      doses,
      levels: [{ time: 35.5, value: 9 }],
      priorWarnings: warnings,
    });
    expect(r.outcome).toBe('converged');
    expect(r.warnings.map((w) => w.code)).toContain('covariate-out-of-range');
    expect(Object.keys(r.estimates).sort()).toEqual(Object.keys(prior.variability).sort());
  });
});
