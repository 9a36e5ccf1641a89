import { describe, expect, it } from 'vitest';
import { maintenanceAfterPortions, oralLoadingPortions } from '../dosing/oral-loading';

describe('dosing/oral-loading (common practice: oral phenytoin loading in ~400 mg parts)', () => {
  it('splits into parts of at most 400 mg, 2 h apart, adding up to the dose', () => {
    expect(oralLoadingPortions(1000)).toEqual([
      { offsetH: 0, amount: 400 },
      { offsetH: 2, amount: 400 },
      { offsetH: 4, amount: 200 },
    ]);
    expect(oralLoadingPortions(400)).toEqual([{ offsetH: 0, amount: 400 }]);
  });

  it('starts maintenance one interval after the first part, never before the last part has a spacing', () => {
    expect(maintenanceAfterPortions(oralLoadingPortions(1200), 24)).toBe(24);
    expect(maintenanceAfterPortions(oralLoadingPortions(2000), 8)).toBe(10);
  });
});
