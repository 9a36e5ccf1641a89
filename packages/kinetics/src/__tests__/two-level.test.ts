import { Solver } from 'odex';
import { describe, expect, it } from 'vitest';
import { designPeakTroughRegimen, twoLevelEstimate } from '../estimation/two-level';

// Independent reference: one-compartment infusion by superposition of single-dose terms
// (pk-reference A2 and A4: C(t) = Σ_j (R0/CL)(1 − e^(−k·min(t−t_j, T)))·e^(−k·max(0, t−t_j−T))).
// Source: Gibaldi M, Perrier D. Pharmacokinetics, 2nd ed., 1982, ch. 1 and 3 (from memory).
function superposed(
  k: number,
  V: number,
  doses: { time: number; amount: number; duration: number }[],
  t: number,
): number {
  const CL = k * V;
  let c = 0;
  for (const d of doses) {
    if (t <= d.time) continue;
    const R0 = d.amount / d.duration;
    const s = t - d.time;
    c +=
      (R0 / CL) *
      (1 - Math.exp(-k * Math.min(s, d.duration))) *
      Math.exp(-k * Math.max(0, s - d.duration));
  }
  return c;
}
const TOL = 1e-6; // relative; the equations are exact for a noiseless one-compartment case

describe('estimation/two-level', () => {
  // Constructed case (not a textbook problem): the published worked examples could not be checked here,
  // so the case is built from the closed forms of pk-reference A2/A4/A5 and the method must invert them.
  // Gentamicin-like: k 0.2 1/h, V 18 L, 120 mg over 0.5 h every 8 h, 10 doses (≈ 23 half-lives: steady state).
  const k = 0.2;
  const V = 18;
  const doses = Array.from({ length: 10 }, (_, i) => ({ time: 8 * i, amount: 120, duration: 0.5 }));
  const t1 = 72 + 1.5;
  const t2 = 72 + 7.5;
  const levels = [
    { time: t1, value: superposed(k, V, doses, t1) },
    { time: t2, value: superposed(k, V, doses, t2) },
  ];

  it('twoLevelEstimate({doses, levels}) at steady state recovers k, V, CL and t½ (steady-state form)', () => {
    const r = twoLevelEstimate({ doses, levels });
    expect(r.outcome).toBe('estimated');
    if (r.outcome !== 'estimated') return;
    expect(r.form).toBe('steady-state');
    expect(Math.abs(r.k / k - 1)).toBeLessThan(TOL);
    expect(Math.abs(r.V / V - 1)).toBeLessThan(TOL);
    expect(Math.abs(r.CL / (k * V) - 1)).toBeLessThan(TOL);
    expect(r.halfLife).toBeCloseTo(Math.LN2 / k, 6);
    expect(r.warnings.map((w) => w.code)).not.toContain('not-steady-state');
    // AUC24 by Pai et al. 2014 first-order equations vs the identity AUC24,ss = daily dose / CL (pk-reference A7).
    // The first-order equations approximate the infusion phase linearly, so allow 0.5 %.
    expect(Math.abs(r.auc24! / ((120 * 3) / (k * V)) - 1)).toBeLessThan(0.005);
  });

  it('twoLevelEstimate after the first dose uses the first-dose form (Cmin = 0)', () => {
    const first = [{ time: 0, amount: 1000, duration: 1 }];
    const kv = 0.08;
    const Vv = 50;
    const lv = [
      { time: 3, value: superposed(kv, Vv, first, 3) },
      { time: 11, value: superposed(kv, Vv, first, 11) },
    ];
    const r = twoLevelEstimate({
      doses: first,
      levels: lv,
      options: { distributionPhaseHours: 1 },
    });
    expect(r.outcome).toBe('estimated');
    if (r.outcome !== 'estimated') return;
    expect(r.form).toBe('first-dose');
    expect(r.k).toBeCloseTo(kv, 9);
    expect(r.V).toBeCloseTo(Vv, 6);
    // closed form A2 at the end of the infusion: (R0/CL)(1 − e^(−kT))
    expect(r.cmax).toBeCloseTo((1000 / (kv * Vv)) * (1 - Math.exp(-kv)), 6);
  });

  it('twoLevelEstimate with a measured pre-dose level uses it (not at steady state)', () => {
    const d3 = doses.slice(0, 3);
    const pre = superposed(k, V, d3, 16);
    const lv = [
      { time: 17.5, value: superposed(k, V, d3, 17.5) },
      { time: 22, value: superposed(k, V, d3, 22) },
    ];
    const r = twoLevelEstimate({ doses: d3, levels: lv, options: { predoseLevel: pre } });
    expect(r.outcome === 'estimated' && r.form).toBe('measured-predose');
    if (r.outcome === 'estimated') expect(r.V).toBeCloseTo(V, 6);
  });

  it('warns when the steady-state form is used before steady state', () => {
    const d2 = doses.slice(0, 2);
    const lv = [
      { time: 9.5, value: superposed(k, V, d2, 9.5) },
      { time: 15, value: superposed(k, V, d2, 15) },
    ];
    const r = twoLevelEstimate({ doses: d2, levels: lv, options: { form: 'steady-state' } });
    expect(r.warnings.map((w) => w.code)).toContain('not-steady-state');
  });

  it.each([
    [
      'during-infusion',
      [
        { time: 72.25, value: 5 },
        { time: 79, value: 2 },
      ],
    ],
    [
      'same-time',
      [
        { time: 74, value: 5 },
        { time: 74, value: 4 },
      ],
    ],
    [
      'not-falling',
      [
        { time: 74, value: 4 },
        { time: 79, value: 5 },
      ],
    ],
    [
      'different-intervals',
      [
        { time: 66, value: 5 },
        { time: 74, value: 2 },
      ],
    ],
    [
      'distribution-phase',
      [
        { time: 72.6, value: 5 },
        { time: 79, value: 2 },
      ],
    ],
  ])('twoLevelEstimate refuses %s levels with a reason', (code, lv) => {
    const r = twoLevelEstimate({ doses, levels: lv });
    expect(r.outcome).toBe('refused');
    if (r.outcome === 'refused') {
      expect(r.refusals.map((x) => x.code)).toContain(code);
      expect(r.refusals[0]!.message.length).toBeGreaterThan(20);
    }
  });

  it('levels from a general-purpose ODE solver (odex, npm) give the same k and V', () => {
    // odex 2.0.4 (Hairer's ODEX extrapolation code) on dC/dt = R(t)/V − k·C, one segment per
    // infusion-on / infusion-off stretch, rtol = atol = 1e-12: no closed form and none of our integrator.
    const rate = (t: number) =>
      doses.reduce(
        (r, d) => r + (t >= d.time && t < d.time + d.duration ? d.amount / d.duration : 0),
        0,
      );
    const edges = [...new Set(doses.flatMap((d) => [d.time, d.time + d.duration]))].sort(
      (a, b) => a - b,
    );
    const at = (tEnd: number) => {
      let c = 0;
      let t = 0;
      for (const e of [...edges.filter((x) => x > 0 && x < tEnd), tEnd]) {
        const mid = (t + e) / 2;
        const R = rate(mid);
        const solver = new Solver(1);
        solver.relativeTolerance = 1e-12;
        solver.absoluteTolerance = 1e-12;
        solver.maxSteps = 1e6;
        c = solver.solve((_x: number, y: number[]) => [R / V - k * y[0]!], t, [c], e).y[0]!;
        t = e;
      }
      return c;
    };
    const r = twoLevelEstimate({
      doses,
      levels: [
        { time: t1, value: at(t1) },
        { time: t2, value: at(t2) },
      ],
    });
    expect(r.outcome).toBe('estimated');
    if (r.outcome !== 'estimated') return;
    expect(Math.abs(r.k / k - 1)).toBeLessThan(1e-6);
    expect(Math.abs(r.V / V - 1)).toBeLessThan(1e-6);
  });

  it('throws clear errors for bad input (no levels, negative value, before first dose)', () => {
    expect(() => twoLevelEstimate({ doses, levels: [] })).toThrow(/at least one measured level/);
    expect(() =>
      twoLevelEstimate({
        doses,
        levels: [
          { time: 74, value: -1 },
          { time: 79, value: 2 },
        ],
      }),
    ).toThrow(/levels\[0\]\.value is negative/);
    expect(() =>
      twoLevelEstimate({
        doses,
        levels: [
          { time: -1, value: 1 },
          { time: 79, value: 2 },
        ],
      }),
    ).toThrow(/before the first dose/);
    expect(() => twoLevelEstimate({ doses: [], levels })).toThrow(
      /doses must be a non-empty array/,
    );
  });
});

describe('estimation/two-level designPeakTroughRegimen', () => {
  it('designPeakTroughRegimen({k, V, peak, trough, T}) reproduces the target peak and trough (closed form A5)', () => {
    const k = 0.25;
    const V = 17;
    const T = 0.5;
    const r = designPeakTroughRegimen({
      k,
      V,
      targetPeak: 9,
      targetTrough: 1,
      infusionDuration: T,
    });
    const R0 = r.dose / T;
    const peak = ((R0 / (k * V)) * (1 - Math.exp(-k * T))) / (1 - Math.exp(-k * r.interval));
    expect(peak).toBeCloseTo(9, 9);
    expect(peak * Math.exp(-k * (r.interval - T))).toBeCloseTo(1, 9);
  });

  it('rounds to a practical interval not longer than the exact one and reports the rounded regimen', () => {
    const r = designPeakTroughRegimen({
      k: 0.25,
      V: 17,
      targetPeak: 9,
      targetTrough: 1,
      infusionDuration: 0.5,
      practicalIntervals: [6, 8, 12, 24],
      amountStep: 10,
    });
    expect(r.interval).toBeGreaterThan(8);
    expect(r.practical!.interval).toBe(8);
    expect(r.practical!.dose % 10).toBe(0);
    expect(Math.abs(r.practical!.peak - 9)).toBeLessThan(0.3);
  });
});
