import { describe, expect, it } from 'vitest';
import { normalCdf } from '../estimation/normal';
import { findRegimens } from '../regimen/finder';
import {
  mergePtaResults,
  probabilityOfTargetAttainment,
  ptaChunks,
  type PtaInput,
} from '../pta/pta';
import type { ModelStructure } from '../types';

const MM1: ModelStructure = { compartments: 1, elimination: 'michaelis-menten' };
// Phenytoin-like typical values (pk-reference D3: Vmax 415 mg/day, Km 5.7 mg/L, oral F 0.859).
const typical = { V1: 49, Vmax: 415 / 24, Km: 5.7, ka: 0.3, F: 0.859 };
const S = 0.92;
const target = { css: { min: 10, max: 20 } };
// 300 mg/day oral: R = 0.92·0.859·300/24 = 9.88 mg/h → Css 7.6 (below range);
// 400 mg/day: Css 18.2 (in range); 550 mg/day: R = 18.1 mg/h ≥ Vmax 17.3 (no steady state).
const regimens = [300, 400, 550].map((amount) => ({
  amount,
  interval: 24,
  infusionDuration: 0,
  regimenKind: 'oral' as const,
  saltFactor: S,
}));
const base: PtaInput = {
  model: MM1,
  source: { kind: 'population', prior: { typical, variability: { Vmax: 0.15, Km: 0.47 } } },
  regimens,
  target,
  n: 4000,
  seed: 11,
};

describe('pta/pta probabilityOfTargetAttainment (Michaelis-Menten)', () => {
  it('with zero variability PTA is exactly 0 or 1, and R ≥ Vmax is counted as "no steady state"', () => {
    // Source: Winter ME, Basic Clinical Pharmacokinetics, phenytoin chapter (from memory) — pk-reference A8
    const r = probabilityOfTargetAttainment({
      ...base,
      source: { kind: 'population', prior: { typical, variability: {} } },
      n: 40,
    });
    expect(r.regimens.map((x) => x.probability)).toEqual([0, 1, 0]);
    expect(r.regimens.map((x) => x.noSteadyState)).toEqual([0, 0, 40]);
    expect(r.regimens[2]!.perTarget.css).toBe(0);
    expect(r.warnings.map((w) => w.code)).toContain('no-steady-state');
  });

  it('is reproducible with a seed; chunks merge to the whole run, no-steady-state counts included', () => {
    const a = probabilityOfTargetAttainment(base);
    expect(probabilityOfTargetAttainment(base)).toEqual(a);
    expect(probabilityOfTargetAttainment({ ...base, seed: 12 })).not.toEqual(a);
    const merged = mergePtaResults(
      ptaChunks(base.n, 3).map((range) => probabilityOfTargetAttainment({ ...base, range })),
    );
    expect(merged.regimens).toEqual(a.regimens);
  });

  it('the no-steady-state fraction matches P(Vmax·e^η ≤ R) = Φ(ln(R/Vmax)/ω) within 4 standard errors', () => {
    // Source: log-normal Vmax (pk-reference D3: Vmax IIV 10–20 % CV); R ≥ Vmax ⇔ η ≥ ln(R/Vmax).
    const r = probabilityOfTargetAttainment({ ...base, n: 20000 });
    const R = (S * 0.859 * 550) / 24;
    const p = normalCdf(Math.log(R / typical.Vmax) / 0.15);
    const got = r.regimens[2]!.noSteadyState / 20000;
    expect(Math.abs(got - p)).toBeLessThan(4 * Math.sqrt((p * (1 - p)) / 20000));
    expect(r.regimens[2]!.probability).toBeLessThanOrEqual(1 - got);
  });

  it('refuses intermittent peak/trough targets for Michaelis-Menten (no closed form)', () => {
    expect(() =>
      probabilityOfTargetAttainment({ ...base, target: { trough: { min: 10 } } }),
    ).toThrow(/Michaelis-Menten/);
  });
});

describe('pta/pta probabilityOfTargetAttainment (oral and continuous, linear)', () => {
  const ONE: ModelStructure = { compartments: 1, elimination: 'linear' };
  const p = { CL: 5, V1: 50, ka: 1.1, F: 0.8, tlag: 0.5 };

  it('zero variability reproduces the finder’s oral steady state (AUC identity, A4 peak/trough)', () => {
    // Source: Gibaldi & Perrier, Pharmacokinetics 2nd ed. 1982, ch. 3 — pk-reference A4/A7
    const t = { auc24: { min: 300, max: 400 }, trough: { min: 8 } };
    const f = findRegimens({
      model: ONE,
      parameters: p,
      target: t,
      regimenKind: 'oral',
      options: { amountStep: 100, minAmount: 100, maxCandidates: 100 },
    });
    const sample = f.candidates.slice(0, 6);
    const r = probabilityOfTargetAttainment({
      model: ONE,
      source: { kind: 'population', prior: { typical: p, variability: {} } },
      regimens: sample.map((c) => ({
        amount: c.amount,
        interval: c.interval,
        infusionDuration: 0,
        regimenKind: 'oral',
      })),
      target: t,
      n: 10,
      seed: 1,
    });
    sample.forEach((c, i) => expect(r.regimens[i]!.probability).toBe(c.allTargetsMet ? 1 : 0));
  });

  it('continuous infusion: Css = R0/CL decides attainment; with variability the PTA equals P(CL in range)', () => {
    // Source: pk-reference A2 (Css = R0/CL); CL log-normal, so Css in [20, 25] ⇔ CL in [R0/25, R0/20].
    const TWO: ModelStructure = { compartments: 2, elimination: 'linear' };
    const typ = { CL: 4.2, V1: 35, Q: 6, V2: 45 };
    const reg = {
      amount: 2250,
      interval: 24,
      infusionDuration: 0,
      regimenKind: 'continuous-infusion' as const,
    };
    const none = probabilityOfTargetAttainment({
      model: TWO,
      source: { kind: 'population', prior: { typical: typ, variability: {} } },
      regimens: [reg],
      target: { css: { min: 20, max: 25 } },
      n: 5,
      seed: 3,
    });
    expect(none.regimens[0]!.probability).toBe(1); // 93.75/4.2 = 22.3 mg/L
    const n = 20000;
    const r = probabilityOfTargetAttainment({
      model: TWO,
      source: { kind: 'population', prior: { typical: typ, variability: { CL: 0.3 } } },
      regimens: [reg],
      target: { css: { min: 20, max: 25 } },
      n,
      seed: 3,
    });
    const R0 = 2250 / 24;
    const z = (cl: number): number => Math.log(cl / 4.2) / 0.3;
    const expected = normalCdf(z(R0 / 20)) - normalCdf(z(R0 / 25));
    expect(Math.abs(r.regimens[0]!.probability - expected)).toBeLessThan(
      4 * Math.sqrt((expected * (1 - expected)) / n),
    );
  });
});
