import { describe, expect, it } from 'vitest';
import { generateRegimen } from '../dosing/regimen';
import { EngineError } from '../errors';

describe('dosing/regimen', () => {
  it('generateRegimen({ loadingDose, maintenanceDose, interval, infusionDuration, numberOfDoses })', () => {
    const d = generateRegimen({
      route: 'infusion',
      loadingDose: 2000,
      loadingInfusionDuration: 2,
      maintenanceDose: 1250,
      interval: 12,
      infusionDuration: 1.5,
      numberOfDoses: 3,
    });
    expect(d).toEqual([
      { time: 0, amount: 2000, route: 'infusion', duration: 2 },
      { time: 12, amount: 1250, route: 'infusion', duration: 1.5 },
      { time: 24, amount: 1250, route: 'infusion', duration: 1.5 },
      { time: 36, amount: 1250, route: 'infusion', duration: 1.5 },
    ]);
  });

  it('generateRegimen({ endTime }) stops before endTime; times are exact multiples (no drift)', () => {
    const d = generateRegimen({
      route: 'oral',
      start: 0.1,
      maintenanceDose: 100,
      interval: 0.1,
      endTime: 100.1,
    });
    expect(d.length).toBe(1000);
    expect(d[999]?.time).toBe(0.1 + 999 * 0.1);
    expect(d[0]).toEqual({ time: 0.1, amount: 100, route: 'oral' });
  });

  it('generateRegimen refuses a missing infusion duration and both/neither of numberOfDoses/endTime', () => {
    expect(() =>
      generateRegimen({ route: 'infusion', maintenanceDose: 1, interval: 8, numberOfDoses: 2 }),
    ).toThrowError(EngineError);
    expect(() => generateRegimen({ route: 'bolus', maintenanceDose: 1, interval: 8 })).toThrowError(
      /exactly one/,
    );
    expect(() =>
      generateRegimen({ route: 'bolus', maintenanceDose: 1, interval: 0, numberOfDoses: 1 }),
    ).toThrowError(/interval/);
  });
});
