import { describe, expect, it } from 'vitest';
import { creatinineMgDlFromUmolL, creatinineUmolLFromMgDl } from '../covariates/creatinine-units';
import { EngineError } from '../errors';

describe('covariates/creatinine-units', () => {
  it('creatinineMgDlFromUmolL(110) gives 1.244344 mg/dL', () => {
    // common practice: 1 mg/dL = 88.4 µmol/L (creatinine molar mass 113.12 g/mol)
    expect(creatinineMgDlFromUmolL(110)).toBeCloseTo(1.244344, 6);
  });

  it('round-trips mg/dL → µmol/L → mg/dL', () => {
    expect(creatinineMgDlFromUmolL(creatinineUmolLFromMgDl(1.3))).toBeCloseTo(1.3, 12);
  });

  it('refuses a creatinine of 0 with an EngineError naming the field', () => {
    expect(() => creatinineMgDlFromUmolL(0)).toThrowError(EngineError);
    expect(() => creatinineMgDlFromUmolL(0)).toThrowError(/creatinine/);
  });
});
