import { describe, expect, it } from 'vitest';
import {
  enforceInfusionTime,
  minimumInfusionHours,
  practicalFromDefinition,
  snapDose,
} from './practical';

describe('snapDose', () => {
  it('snapDose(1380, 250) rounds to the nearest vial multiple, 1500 mg', () => {
    // Source: rounding vancomycin to 250 mg is common practice in hospital protocols.
    expect(snapDose(1380, 250)).toBe(1500);
    expect(snapDose(1370, 250)).toBe(1250);
  });
  it('never snaps below one step, and treats nonsense as one step', () => {
    expect(snapDose(60, 250)).toBe(250);
    expect(snapDose(Number.NaN, 250)).toBe(250);
    expect(snapDose(-5, 50)).toBe(50);
  });
});

describe('infusion-rate cap', () => {
  it('minimumInfusionHours(1500, 1000) is 1.5 h', () => {
    // Source: ≤ 1 g/h vancomycin (Rybak et al. 2020 consensus, haemodialysis summary; site-configurable).
    expect(minimumInfusionHours(1500, 1000)).toBe(1.5);
    expect(minimumInfusionHours(1500, null)).toBe(0);
  });
  it('enforceInfusionTime lengthens an infusion that would run too fast', () => {
    expect(enforceInfusionTime(1, 1500, 1000)).toEqual({
      infusionH: 1.5,
      limitedByRate: true,
      minimumH: 1.5,
    });
    expect(enforceInfusionTime(2, 1500, 1000)).toEqual({
      infusionH: 2,
      limitedByRate: false,
      minimumH: 1.5,
    });
  });
  it('snaps to quarter hours, rounding the minimum up', () => {
    // 1750 mg at 1000 mg/h needs 1.75 h; 1800 mg needs 1.8 h, offered as 2 h.
    expect(enforceInfusionTime(1, 1750, 1000).infusionH).toBe(1.75);
    expect(enforceInfusionTime(1, 1800, 1000).infusionH).toBe(2);
    expect(enforceInfusionTime(1.1, 500, null).infusionH).toBe(1);
  });
});

describe('practicalFromDefinition', () => {
  it('reads the library practical settings and falls back safely when absent', () => {
    const found = practicalFromDefinition({
      practical: {
        doseRoundingMg: 250,
        maxInfusionRateMgPerH: 1000,
        usualIntervalsH: [8, 12, 24],
        defaultInfusionH: 1,
      },
    });
    expect(found.found).toBe(true);
    expect(found.settings.doseRoundingMg).toBe(250);
    const missing = practicalFromDefinition(undefined);
    expect(missing.found).toBe(false);
    expect(missing.settings).toMatchObject({ doseRoundingMg: 1, maxInfusionRateMgPerH: null });
  });
});
