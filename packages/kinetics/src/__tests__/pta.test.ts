import { describe, expect, it } from 'vitest';
import { fitMap } from '../estimation/map-fit';
import {
  mergePtaResults,
  probabilityOfTargetAttainment,
  ptaChunks,
  type PtaInput,
} from '../pta/pta';
import { mulberry32, streamSeed, fillStandardNormals } from '../pta/random';
import type { Dose, ModelStructure } from '../types';

const model: ModelStructure = { compartments: 2, elimination: 'linear' };
const typical = { CL: 4, V1: 30, Q: 6, V2: 40 };
// Variability in the range quoted for vancomycin (CL CV 25–40 %, V 15–35 %; common practice).
const variability = { CL: 0.3, V1: 0.25 };
const target = { auc24: { min: 400, max: 600 } };
const regimens = [
  { amount: 1000, interval: 12, infusionDuration: 1 },
  { amount: 1250, interval: 12, infusionDuration: 1.5 },
];
const base: PtaInput = {
  model,
  source: { kind: 'population', prior: { typical, variability } },
  regimens,
  target,
  n: 4000,
  seed: 7,
};

describe('pta/random', () => {
  it('mulberry32(seed) is reproducible and roughly uniform; Box–Muller deviates have mean 0, SD 1', () => {
    const a = mulberry32(123);
    const b = mulberry32(123);
    for (let i = 0; i < 5; i++) expect(a()).toBe(b());
    const u = mulberry32(streamSeed(1, 2));
    const z = fillStandardNormals(u, new Array<number>(20000).fill(0));
    const mean = z.reduce((s, x) => s + x, 0) / z.length;
    const sd = Math.sqrt(z.reduce((s, x) => s + (x - mean) ** 2, 0) / (z.length - 1));
    expect(Math.abs(mean)).toBeLessThan(0.03); // 4 × SE (1/√20000 ≈ 0.007)
    expect(Math.abs(sd - 1)).toBeLessThan(0.03);
  });
});

describe('pta/pta probabilityOfTargetAttainment', () => {
  it('with zero variability PTA is exactly 0 or 1', () => {
    const none = {
      ...base,
      source: { kind: 'population' as const, prior: { typical, variability: {} } },
      n: 50,
    };
    const r = probabilityOfTargetAttainment(none);
    // AUC24,ss = daily dose / CL: 2000/4 = 500 (in range), 2500/4 = 625 (out of range).
    expect(r.regimens[0]!.probability).toBe(1);
    expect(r.regimens[1]!.probability).toBe(0);
  });

  it('seeded runs are reproducible and different seeds differ', () => {
    const a = probabilityOfTargetAttainment(base);
    const b = probabilityOfTargetAttainment(base);
    expect(a).toEqual(b);
    const c = probabilityOfTargetAttainment({ ...base, seed: 8 });
    expect(c.regimens[0]!.attained).not.toBe(a.regimens[0]!.attained);
  });

  it('chunked = unchunked, for any split', () => {
    const whole = probabilityOfTargetAttainment(base);
    for (const k of [2, 3, 7]) {
      const parts = ptaChunks(base.n, k).map((range) =>
        probabilityOfTargetAttainment({ ...base, range }),
      );
      const merged = mergePtaResults(parts.reverse());
      expect(merged.regimens).toEqual(whole.regimens);
    }
  });

  it('converges as N grows toward the analytic PTA for an AUC-only target', () => {
    // AUC24 = 2000/CL with ln CL ~ N(ln 4, 0.3²): P(400 ≤ AUC ≤ 600) = Φ((ln 5 − ln 4)/0.3) − Φ((ln(10/3) − ln 4)/0.3).
    // Computed with the standard normal CDF: Φ(0.74381) − Φ(−0.60774) = 0.77150 − 0.27168 = 0.49982 (own calculation).
    const exact = 0.49982;
    const runs = [250, 4000, 64000].map(
      (n) => probabilityOfTargetAttainment({ ...base, n, regimens: [regimens[0]!] }).regimens[0]!,
    );
    expect(Math.abs(runs[2]!.probability - exact)).toBeLessThan(0.01); // SE at 64 000 ≈ 0.002
    // Monte Carlo SE falls as 1/√N: 16× more patients → 4× smaller.
    expect(runs[1]!.standardError / runs[0]!.standardError).toBeCloseTo(0.25, 1);
    expect(runs[2]!.standardError / runs[1]!.standardError).toBeCloseTo(0.25, 1);
    for (const r of runs) expect(Math.abs(r.probability - exact)).toBeLessThan(4 * r.standardError);
  });

  it('samples from the Laplace posterior after a fit (narrower than the prior)', () => {
    const doses: Dose[] = Array.from({ length: 4 }, (_, i) => ({
      time: 12 * i,
      amount: 1000,
      route: 'infusion',
      duration: 1,
    }));
    const fit = fitMap({
      model,
      prior: { typical, variability, residualError: { additive: 1, proportional: 0.1 } },
      doses,
      levels: [
        { time: 38, value: 28 },
        { time: 47.5, value: 12 },
      ],
    });
    const post = probabilityOfTargetAttainment({
      ...base,
      source: {
        kind: 'posterior',
        parameters: fit.parameters as unknown as Record<string, number>,
        estimated: fit.estimated,
        covarianceEta: fit.covarianceEta!,
      },
    });
    const pop = probabilityOfTargetAttainment(base);
    // The best regimen's attainment is more decisive under the posterior than under the prior.
    const decisiveness = (p: number): number => Math.abs(p - 0.5);
    expect(Math.max(...post.regimens.map((r) => decisiveness(r.probability)))).toBeGreaterThan(
      Math.max(...pop.regimens.map((r) => decisiveness(r.probability))),
    );
  });

  it('refuses bad input', () => {
    expect(() => probabilityOfTargetAttainment({ ...base, n: 0 })).toThrow(
      /n must be a positive integer/,
    );
    expect(() => probabilityOfTargetAttainment({ ...base, range: [10, 5] })).toThrow(/range/);
    expect(() =>
      probabilityOfTargetAttainment({
        ...base,
        regimens: [{ amount: 1000, interval: 1, infusionDuration: 2 }],
      }),
    ).toThrow(/regimens\[0\]/);
  });
});
