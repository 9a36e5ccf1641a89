import { describe, expect, it } from 'vitest';
import { EngineError } from '../errors';
import {
  amikacinExtendedInterval,
  drugModelLibrary,
  gentamicinExtendedInterval,
  phenytoinGrasela1983,
  vancomycinGoti2018,
} from '../library/drug-models';
import { compileCovariateExpression } from '../library/expression';
import {
  individualParameters,
  omegaFromCv,
  populationPriorFromLibrary,
} from '../library/individual';
import { validateDrugModel } from '../library/validate-entry';

describe('library/drug-models', () => {
  for (const [id, entry] of Object.entries(drugModelLibrary)) {
    it(`validateDrugModel(${id}) reports no problems`, () => {
      expect(validateDrugModel(entry)).toEqual({ ok: true, problems: [] });
    });
  }

  it('individualParameters(vancomycinGoti2018, reference covariates) gives the typical values', () => {
    // Source: Goti V et al., Ther Drug Monit 2018;40:212-221, Table 2 (CL 4.5 L/h at CrCl 120, Vc 58.4 L at 70 kg; Q 6.5 from memory)
    const { parameters, warnings } = individualParameters(vancomycinGoti2018, {
      CRCL: 120,
      WT: 70,
      HD: 0,
    });
    expect(parameters).toEqual({ CL: 4.5, V1: 58.4, Q: 6.5, V2: 38.4 });
    expect(warnings).toEqual([]);
  });

  it('individualParameters(vancomycinGoti2018, HD = 1) multiplies CL by 0.7 and Vc by 0.5', () => {
    // Source: Goti V et al., Ther Drug Monit 2018;40:212-221 (haemodialysis factors, seen in a secondary summary)
    const { parameters } = individualParameters(vancomycinGoti2018, { CRCL: 120, WT: 70, HD: 1 });
    expect(parameters.CL).toBeCloseTo(4.5 * 0.7, 12);
    expect(parameters.V1).toBeCloseTo(58.4 * 0.5, 12);
  });

  it('individualParameters(gentamicin, CrCl 100, 70 kg): V = 0.26·WT, CL = (0.00293·CrCl + 0.014)·V', () => {
    // Source: Bauer LA, Applied Clinical Pharmacokinetics, aminoglycoside chapter (V 0.26 L/kg; ke formula from memory)
    const { parameters } = individualParameters(gentamicinExtendedInterval, { CRCL: 100, WT: 70 });
    expect(parameters.V1).toBeCloseTo(18.2, 12);
    expect(parameters.CL).toBeCloseTo(0.307 * 18.2, 12);
    expect(gentamicinExtendedInterval.parameters.CL?.typical).toBeCloseTo(0.307 * 18.2, 2);
    expect(amikacinExtendedInterval.parameters.CL?.typical).toBeCloseTo(0.307 * 14.7, 2);
  });

  it('individualParameters(phenytoin, 70 kg) gives Vmax 415 mg/day in mg/h and Km 5.7 mg/L', () => {
    // Source: Grasela TH et al., Clin Pharmacokinet 1983;8:355-64 (Vm 415 mg/day, Km 5.7 mg/L, Vm ∝ weight^0.6)
    const { parameters } = individualParameters(phenytoinGrasela1983, { WT: 70 });
    expect(parameters.Vmax).toBeCloseTo(415 / 24, 12);
    expect(parameters.Km).toBe(5.7);
    const heavy = individualParameters(phenytoinGrasela1983, { WT: 100 }).parameters;
    expect(heavy.Vmax).toBeCloseTo((415 / 24) * (100 / 70) ** 0.6, 12);
    expect(phenytoinGrasela1983.practical.saltFactor).toBe(0.92);
  });

  it('individualParameters warns for a covariate outside the model range and refuses a missing one', () => {
    const r = individualParameters(vancomycinGoti2018, { CRCL: 200, WT: 70, HD: 0 });
    expect(r.warnings.map((w) => w.code)).toEqual(['covariate-out-of-range']);
    expect(() => individualParameters(vancomycinGoti2018, { CRCL: 100, HD: 0 })).toThrowError(/WT/);
  });

  it('populationPriorFromLibrary converts CV % to ω = √ln(1 + CV²)', () => {
    // Source: log-normal variance identity CV² = e^(ω²) − 1 — common practice
    const { prior } = populationPriorFromLibrary(gentamicinExtendedInterval, { CRCL: 100, WT: 70 });
    expect(prior.variability.CL).toBeCloseTo(Math.sqrt(Math.log(1 + 0.282 ** 2)), 12);
    expect(prior.residualError).toEqual({ additive: 0.2, proportional: 0.1 });
    expect(omegaFromCv(50)).toBeCloseTo(0.4724, 4);
  });
});

describe('library/validate-entry', () => {
  it('validateDrugModel(entry with problems) lists each bad field', () => {
    const bad = {
      ...vancomycinGoti2018,
      id: '',
      structure: { compartments: 2, elimination: 'linear' },
      parameters: {
        ...vancomycinGoti2018.parameters,
        Q: undefined,
        CL: { ...vancomycinGoti2018.parameters.CL, expression: 'THETA * (EGFR / 90)' },
        V1: { typical: -3, unit: 'L', source: '', fromMemory: 'no' },
      },
      residualError: { model: 'combined', proportional: 0.1, source: 'x', fromMemory: false },
      practical: {
        ...vancomycinGoti2018.practical,
        siFactor: 0,
        // 6 h is not among the usual intervals, so it cannot be a preferred one.
        preferredIntervalsH: [6, 12],
        usualMaxSingleDoseMg: 0,
      },
    };
    const fields = validateDrugModel(bad).problems.map((p) => p.field);
    expect(fields).toEqual(
      expect.arrayContaining([
        'id',
        'parameters.Q',
        'parameters.CL.expression',
        'parameters.V1.typical',
        'parameters.V1.source',
        'parameters.V1.fromMemory',
        'residualError.additive',
        'practical.siFactor',
        'practical.preferredIntervalsH',
        'practical.usualMaxSingleDoseMg',
      ]),
    );
    expect(validateDrugModel(null).ok).toBe(false);
  });

  it.each([
    'import({ x: 1 })',
    'createUnit("foo")',
    'evaluate("1 + 1")',
    'parse("1")',
    'THETA = 3',
    'f(x) = x',
    'WT.constructor',
    '[WT, 1]',
    'WT > 70 ? 1 : 2',
    'cos(WT)',
    '"text"',
    'WT == 3',
  ])('compileCovariateExpression(%j) is refused', (src) => {
    // Source: mathjs security documentation (disable import/createUnit/evaluate/parse…; allow-list the syntax)
    expect(() => compileCovariateExpression(src)).toThrowError(EngineError);
  });

  it('compileCovariateExpression allows arithmetic, pow, exp, log, min, max, sqrt, abs', () => {
    const e = compileCovariateExpression(
      'max(1, min(WT, 3)) + pow(2, 3) + exp(0) + log(1) + sqrt(4) + abs(-1) - -WT^2 / 2',
    );
    expect(e.evaluate({ WT: 2 })).toBeCloseTo(2 + 8 + 1 + 0 + 2 + 1 + 2, 12);
    expect(() => e.evaluate({})).toThrowError(/WT/);
  });
});
