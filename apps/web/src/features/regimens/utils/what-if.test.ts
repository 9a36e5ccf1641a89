import { describe, expect, it } from 'vitest';
import { regimenDoses, simulateWhatIf } from './what-if';

describe('simulateWhatIf', () => {
  it('matches the one-compartment steady-state AUC24 = daily dose / CL', () => {
    // Source: AUC at steady state over one interval equals dose / CL for linear kinetics (textbook identity).
    const r = simulateWhatIf({ compartments: 1, elimination: 'linear' }, { CL: 4, V1: 50 }, [], {
      doseMg: 1000,
      intervalH: 12,
      infusionH: 1,
      loadingDoseMg: null,
      startHour: 0,
      count: 12,
    });
    expect(r.auc24).toBeCloseTo((2 * 1000) / 4, 0);
    expect(r.peakMgL).toBeGreaterThan(r.troughMgL);
  });
  it('a larger dose gives a proportionally larger AUC24 (linear kinetics)', () => {
    const run = (doseMg: number) =>
      simulateWhatIf({ compartments: 1, elimination: 'linear' }, { CL: 4, V1: 50 }, [], {
        doseMg,
        intervalH: 12,
        infusionH: 1,
        loadingDoseMg: null,
        startHour: 0,
        count: 8,
      }).auc24;
    expect(run(1500) / run(1000)).toBeCloseTo(1.5, 6);
  });
  it('regimenDoses puts the loading dose first, one interval before maintenance', () => {
    const doses = regimenDoses({
      doseMg: 1000,
      intervalH: 12,
      infusionH: 1,
      loadingDoseMg: 2000,
      startHour: 24,
      count: 2,
    });
    expect(doses.map((d) => [d.time, d.amount])).toEqual([
      [24, 2000],
      [36, 1000],
      [48, 1000],
    ]);
  });
  it('oral doses are absorbed with the model F: AUC24 at steady state = F·daily dose / CL', () => {
    // Source: AUCτ,ss = F·D/CL for linear kinetics, any absorption (Gibaldi & Perrier, Pharmacokinetics,
    // 2nd ed., 1982 — from memory; pk-reference A7). As an IV bolus it would read 1/F higher.
    const r = simulateWhatIf(
      { compartments: 1, elimination: 'linear' },
      { CL: 4, V1: 50, ka: 1, F: 0.8 },
      [],
      {
        doseMg: 500,
        intervalH: 12,
        infusionH: 0,
        loadingDoseMg: null,
        absorbed: true,
        startHour: 0,
        count: 20,
      },
    );
    expect(r.auc24).toBeCloseTo((0.8 * 2 * 500) / 4, 0);
  });
  it('an oral loading dose in portions: 400 mg every 2 h, maintenance one interval after the start', () => {
    const doses = regimenDoses({
      doseMg: 300,
      intervalH: 24,
      infusionH: 0,
      loadingDoseMg: 1000,
      absorbed: true,
      loadingPortionMg: 400,
      startHour: 10,
      count: 1,
    });
    expect(doses.map((d) => [d.time, d.amount, d.route])).toEqual([
      [10, 400, 'oral'],
      [12, 400, 'oral'],
      [14, 200, 'oral'],
      [34, 300, 'oral'],
    ]);
  });
});
