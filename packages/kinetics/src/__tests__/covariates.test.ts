import { describe, expect, it } from 'vitest';
import {
  adjustedBodyWeight,
  bsaDuBois,
  bsaMosteller,
  idealBodyWeightDevine,
  leanBodyWeightJanmahasatian,
} from '../covariates/body-size';
import { creatinineMgDlFromUmolL } from '../covariates/creatinine-units';
import { cockcroftGault, egfrBedsideSchwartz, egfrCkdEpi2021 } from '../covariates/renal';
import { EngineError } from '../errors';

/** The worked examples are given to 4 decimals (6 for BSA). */
const DP4 = 4;

function expectEngineError(f: () => unknown, field: string): void {
  try {
    f();
    expect.unreachable();
  } catch (e) {
    expect(e).toBeInstanceOf(EngineError);
    expect((e as EngineError).field).toBe(field);
  }
}

describe('covariates/renal', () => {
  it('cockcroftGault({ 60 y, male, 72 kg, SCr 1.0 }) = 80.0000; female 68.0000', () => {
    // Source: Cockcroft DW, Gault MH, Nephron 1976;16:31-41
    expect(
      cockcroftGault({ ageYears: 60, sex: 'male', weightKg: 72, serumCreatinineMgDl: 1 }),
    ).toBeCloseTo(80, DP4);
    expect(
      cockcroftGault({ ageYears: 60, sex: 'female', weightKg: 72, serumCreatinineMgDl: 1 }),
    ).toBeCloseTo(68, DP4);
  });

  it('cockcroftGault({ 45 y, male, 80 kg, SCr 1.3 }) = 81.1966', () => {
    // Source: Cockcroft DW, Gault MH, Nephron 1976;16:31-41
    expect(
      cockcroftGault({ ageYears: 45, sex: 'male', weightKg: 80, serumCreatinineMgDl: 1.3 }),
    ).toBeCloseTo(81.1966, DP4);
  });

  it('cockcroftGault(SCr 110 µmol/L via exact 88.4 conversion) = 64.2909', () => {
    // Source: Cockcroft DW, Gault MH, Nephron 1976;16:31-41; SI factor 88.4/72 (pk-reference section C example)
    const scr = creatinineMgDlFromUmolL(110);
    expect(
      cockcroftGault({ ageYears: 60, sex: 'male', weightKg: 72, serumCreatinineMgDl: scr }),
    ).toBeCloseTo(64.2909, DP4);
  });

  it('cockcroftGault({ weightBasis: "ideal" | "adjusted" }) uses Devine IBW / IBW + 0.4(TBW − IBW)', () => {
    // Source: Cockcroft & Gault 1976 with Devine BJ, Drug Intell Clin Pharm 1974;8:650-655 (IBW 73 kg at 177.8 cm)
    const base = {
      ageYears: 60,
      sex: 'male' as const,
      weightKg: 120,
      heightCm: 177.8,
      serumCreatinineMgDl: 1,
    };
    expect(cockcroftGault({ ...base, weightBasis: 'ideal' })).toBeCloseTo((80 * 73) / 72, 9);
    expect(cockcroftGault({ ...base, weightBasis: 'adjusted' })).toBeCloseTo((80 * 91.8) / 72, 9);
    expectEngineError(
      () => cockcroftGault({ ...base, heightCm: undefined, weightBasis: 'ideal' }),
      'heightCm',
    );
  });

  it('cockcroftGault refuses negative weight, creatinine 0, µmol/L passed as mg/dL, and children', () => {
    const ok = { ageYears: 60, sex: 'male' as const, weightKg: 72, serumCreatinineMgDl: 1 };
    expectEngineError(() => cockcroftGault({ ...ok, weightKg: -70 }), 'weightKg');
    expectEngineError(
      () => cockcroftGault({ ...ok, serumCreatinineMgDl: 0 }),
      'serumCreatinineMgDl',
    );
    expectEngineError(
      () => cockcroftGault({ ...ok, serumCreatinineMgDl: 110 }),
      'serumCreatinineMgDl',
    );
    expectEngineError(
      () => cockcroftGault({ ...ok, serumCreatinineMgDl: NaN }),
      'serumCreatinineMgDl',
    );
    expectEngineError(() => cockcroftGault({ ...ok, ageYears: 9 }), 'ageYears');
  });

  it.each([
    [0.9, 55, 'female', 75.4988],
    [1.2, 60, 'male', 69.2311],
    [0.6, 40, 'female', 116.2955],
    [0.8, 30, 'male', 122.0973],
    [2.0, 70, 'male', 35.243],
  ] as const)('egfrCkdEpi2021({ SCr %s, %s y, %s }) = %s', (scr, age, sex, expected) => {
    // Source: Inker LA et al., N Engl J Med 2021;385:1737-49
    expect(egfrCkdEpi2021({ serumCreatinineMgDl: scr, ageYears: age, sex })).toBeCloseTo(
      expected,
      DP4,
    );
  });

  it('egfrBedsideSchwartz({ 120 cm, SCr 0.5 }) = 99.1200; ({ 100 cm, 0.4 }) = 103.2500', () => {
    // Source: Schwartz GJ et al., J Am Soc Nephrol 2009;20:629
    expect(egfrBedsideSchwartz({ heightCm: 120, serumCreatinineMgDl: 0.5 })).toBeCloseTo(
      99.12,
      DP4,
    );
    expect(egfrBedsideSchwartz({ heightCm: 100, serumCreatinineMgDl: 0.4 })).toBeCloseTo(
      103.25,
      DP4,
    );
  });

  it('egfrBedsideSchwartz refuses a height in metres and an adult age', () => {
    expectEngineError(
      () => egfrBedsideSchwartz({ heightCm: 1.2, serumCreatinineMgDl: 0.5 }),
      'heightCm',
    );
    expectEngineError(
      () => egfrBedsideSchwartz({ heightCm: 120, serumCreatinineMgDl: 0.5, ageYears: 30 }),
      'ageYears',
    );
  });
});

describe('covariates/body-size', () => {
  it.each([
    [177.8, 73, 68.5],
    [180, 74.9921, 70.4921],
    [165, 61.4094, 56.9094],
  ])('idealBodyWeightDevine(%s cm) = %s (male), %s (female)', (h, m, f) => {
    // Source: Devine BJ, Drug Intell Clin Pharm 1974;8:650-655
    expect(idealBodyWeightDevine(h, 'male')).toBeCloseTo(m, DP4);
    expect(idealBodyWeightDevine(h, 'female')).toBeCloseTo(f, DP4);
  });

  it('idealBodyWeightDevine refuses heights below 60 in and in the wrong unit', () => {
    try {
      idealBodyWeightDevine(150, 'female');
      expect.unreachable();
    } catch (e) {
      expect((e as EngineError).code).toBe('out-of-range');
    }
    expectEngineError(() => idealBodyWeightDevine(1.78, 'male'), 'heightCm');
  });

  it('adjustedBodyWeight(IBW 73, TBW 120) = 91.8000', () => {
    // Source: 0.4 factor, Bauer LA, Applied Clinical Pharmacokinetics — from memory (pk-reference section C example)
    expect(adjustedBodyWeight(73, 120)).toBeCloseTo(91.8, DP4);
  });

  it.each([
    [180, 80, 2.0, 1.996421],
    [170, 70, 1.818119, 1.809708],
    [160, 100, 2.108185, 2.015363],
  ])('bsaMosteller / bsaDuBois(%s cm, %s kg) = %s / %s m²', (h, w, mo, db) => {
    // Source: Mosteller RD, N Engl J Med 1987;317:1098; Du Bois D, Du Bois EF, Arch Intern Med 1916;17:863-71
    expect(bsaMosteller(h, w)).toBeCloseTo(mo, 6);
    expect(bsaDuBois(h, w)).toBeCloseTo(db, 6);
  });

  it('leanBodyWeightJanmahasatian(80 kg, 180 cm) follows 9270·W/(6680 + 216·BMI) (male), 8780/244 (female)', () => {
    // Source: Janmahasatian S et al., Clin Pharmacokinet 2005;44:1051-65 — from memory (own example numbers)
    const bmi = 80 / 1.8 ** 2;
    expect(leanBodyWeightJanmahasatian(80, 180, 'male')).toBeCloseTo(
      (9270 * 80) / (6680 + 216 * bmi),
      10,
    );
    expect(leanBodyWeightJanmahasatian(80, 180, 'female')).toBeCloseTo(
      (9270 * 80) / (8780 + 244 * bmi),
      10,
    );
    expectEngineError(() => leanBodyWeightJanmahasatian(0, 180, 'male'), 'weightKg');
  });
});
