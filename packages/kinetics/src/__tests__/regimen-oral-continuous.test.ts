import { describe, expect, it } from 'vitest';
import { findRegimens, regimenPresets } from '../regimen/finder';
import { exponentialModel, oralSteadyStatePeak } from '../regimen/linear-response';
import { simulate } from '../simulate';
import type { Dose, ModelStructure, PkParameters } from '../types';
import { relErr } from './helpers';

const ONE: ModelStructure = { compartments: 1, elimination: 'linear' };
const TWO: ModelStructure = { compartments: 2, elimination: 'linear' };
// Invented oral patient (magnitudes only): CL 5 L/h, V 50 L, ka 1.1 /h, F 0.8, lag 0.5 h.
const oral: PkParameters = { CL: 5, V1: 50, ka: 1.1, F: 0.8, tlag: 0.5 };
/** Closed form vs closed form: equal to rounding. */
const EXACT = 1e-10;
/** Closed form vs RK4 `simulate` at default options after ≥ 20 half-lives (pk-reference G1: ≥ 7 digits). */
const RK4_SS_TOL = 1e-5;

/** Regular doses every τ for `days`, then the last full interval [tLast − τ, tLast]. */
function longRun(
  amount: number,
  tau: number,
  route: Dose['route'],
  days: number,
  duration?: number,
) {
  const n = Math.ceil((days * 24) / tau);
  const doses: Dose[] = Array.from({ length: n + 1 }, (_, i) =>
    route === 'infusion'
      ? { time: i * tau, amount, route, duration: duration! }
      : { time: i * tau, amount, route },
  );
  return { doses, tLast: n * tau };
}

describe('regimen/finder findRegimens({ regimenKind: "oral" })', () => {
  const r = findRegimens({
    model: ONE,
    parameters: oral,
    target: { trough: { min: 4, max: 10 }, peak: { max: 20 } },
    regimenKind: 'oral',
    options: { amountStep: 100, minAmount: 100, maxCandidates: 50 },
  });

  it('AUC24,ss = F·daily dose/CL, and an RK4 run at steady state agrees', () => {
    // Source: Gibaldi & Perrier, Pharmacokinetics 2nd ed. 1982, ch. 3 — pk-reference A4/A7
    expect(r.regimenKind).toBe('oral');
    for (const c of r.candidates) {
      expect(c.route).toBe('oral');
      expect(relErr(c.steadyState.auc24, (0.8 * c.dailyDose) / 5)).toBeLessThan(EXACT);
    }
    const best = r.candidates[0]!;
    const { doses, tLast } = longRun(best.amount, best.interval, 'oral', 10); // k = 0.1: 24 half-lives
    const sim = simulate({
      model: ONE,
      parameters: oral,
      doses,
      outputTimes: [tLast, tLast - best.interval + best.peakTime],
      aucWindows: [[tLast - best.interval, tLast]],
    });
    expect(relErr((sim.aucs[0]! * 24) / best.interval, best.steadyState.auc24)).toBeLessThan(
      RK4_SS_TOL,
    );
    expect(relErr(sim.concentrations[0]!, best.steadyState.trough)).toBeLessThan(RK4_SS_TOL);
    expect(relErr(sim.concentrations[1]!, best.steadyState.peak)).toBeLessThan(RK4_SS_TOL);
  });

  it('steady-state peak (at tmax,ss) and pre-dose trough equal the A4 closed forms written out here', () => {
    // Source: Gibaldi & Perrier, Pharmacokinetics 2nd ed. 1982, ch. 3 — pk-reference A4:
    // Css(t) = F·D·ka/(V(ka − k))·[e^(−k t)/(1 − e^(−kτ)) − e^(−ka t)/(1 − e^(−ka τ))], t from tlag, modulo τ;
    // tmax,ss = ln[ka(1 − e^(−kτ))/(k(1 − e^(−ka τ)))]/(ka − k) + tlag.
    const k = 0.1;
    const ka = 1.1;
    const css = (D: number, tau: number, t: number): number => {
      let u = (t - 0.5) % tau;
      if (u < 0) u += tau;
      return (
        ((0.8 * D * ka) / (50 * (ka - k))) *
        (Math.exp(-k * u) / (1 - Math.exp(-k * tau)) -
          Math.exp(-ka * u) / (1 - Math.exp(-ka * tau)))
      );
    };
    for (const c of r.candidates) {
      const tau = c.interval;
      const tmax =
        Math.log((ka * (1 - Math.exp(-k * tau))) / (k * (1 - Math.exp(-ka * tau)))) / (ka - k) +
        0.5;
      expect(c.peakTime).toBeCloseTo(tmax, 10);
      expect(relErr(c.steadyState.peak, css(c.amount, tau, tmax))).toBeLessThan(EXACT);
      expect(relErr(c.steadyState.trough, css(c.amount, tau, 0))).toBeLessThan(EXACT);
      // tmax,ss is the maximum: the curve is lower a little either side.
      expect(css(c.amount, tau, tmax - 0.01)).toBeLessThan(c.steadyState.peak);
      expect(css(c.amount, tau, tmax + 0.01)).toBeLessThan(c.steadyState.peak);
    }
  });

  it('two compartments and IM: the numerical steady-state peak and trough agree with RK4', () => {
    // Source: RK4 `simulate` of the same regimen for 20 days (superposition, pk-reference A4).
    const p: PkParameters = { CL: 3.2, V1: 25, Q: 5, V2: 60, ka: 2.5, F: 0.95, tlag: 0.1 };
    const im = findRegimens({
      model: TWO,
      parameters: p,
      target: { auc24: { min: 100, max: 200 } },
      regimenKind: 'intramuscular',
      options: { amountStep: 50, minAmount: 50, intervals: [12, 24], maxCandidates: 5 },
    });
    expect(im.regimenKind).toBe('intramuscular');
    const best = im.candidates[0]!;
    expect(best.allTargetsMet).toBe(true);
    const { doses, tLast } = longRun(best.amount, best.interval, 'oral', 30);
    const sim = simulate({
      model: TWO,
      parameters: p,
      doses,
      outputTimes: [tLast, tLast - best.interval + best.peakTime],
      aucWindows: [[tLast - best.interval, tLast]],
    });
    expect(relErr(sim.concentrations[0]!, best.steadyState.trough)).toBeLessThan(RK4_SS_TOL);
    expect(relErr(sim.concentrations[1]!, best.steadyState.peak)).toBeLessThan(RK4_SS_TOL);
    expect(relErr((sim.aucs[0]! * 24) / best.interval, best.steadyState.auc24)).toBeLessThan(
      RK4_SS_TOL,
    );
    // Peak by the numerical maximiser equals a dense scan of the closed form.
    const m = exponentialModel(TWO, p, true);
    const pk = oralSteadyStatePeak(m, best.amount, best.interval);
    const scan = simulate({
      model: TWO,
      parameters: p,
      doses,
      outputTimes: Array.from(
        { length: 2001 },
        (_, i) => tLast - best.interval + (i * best.interval) / 2000,
      ),
    }).concentrations;
    expect(relErr(Math.max(...scan), pk.concentration)).toBeLessThan(RK4_SS_TOL);
  });

  it('an oral loading dose makes the first peak close to the steady-state peak', () => {
    const withLoad = findRegimens({
      model: ONE,
      parameters: oral,
      target: { auc24: { min: 300, max: 400 } },
      regimenKind: 'oral',
      options: { amountStep: 100, minAmount: 100, loadingDose: { enabled: true, cap: 3000 } },
    });
    const c = withLoad.candidates.find((x) => x.loadingDose)!;
    expect(c.schedule[0]!.amount).toBe(c.loadingDose!.amount);
    expect(c.firstMaintenanceTime).toBe(c.interval);
    const first = simulate({
      model: ONE,
      parameters: oral,
      doses: [c.schedule[0]!],
      outputTimes: Array.from({ length: 241 }, (_, i) => (i * c.interval) / 240),
    }).concentrations;
    // Rounding to 100 mg moves the loading dose by at most 50 mg.
    expect(Math.abs(Math.max(...first) / c.steadyState.peak - 1)).toBeLessThan(
      (50 / c.loadingDose!.amount) * 1.01,
    );
    const sim = simulate({
      model: ONE,
      parameters: oral,
      doses: c.schedule,
      outputTimes: [],
      aucWindows: [[0, 24]],
    });
    expect(relErr(sim.aucs[0]!, c.auc24FirstDay)).toBeLessThan(RK4_SS_TOL);
  });
});

describe('regimen/finder findRegimens({ regimenKind: "continuous-infusion" }) (vancomycin option)', () => {
  const vanc: PkParameters = { CL: 4.2, V1: 35, Q: 6, V2: 45 };
  // Css 20–25 mg/L (from memory: Rybak MJ et al. Am J Health-Syst Pharm 2020;77:835, as practice §2 says).
  const r = findRegimens({
    model: TWO,
    parameters: vanc,
    target: { css: { min: 20, max: 25 } },
    regimenKind: 'continuous-infusion',
    options: { ...regimenPresets.vancomycinContinuous, maxCandidates: 50 },
  });

  it('Css = R0/CL and AUC24 = Css·24; an RK4 run of the infusion reaches that plateau', () => {
    // Source: Gibaldi & Perrier, Pharmacokinetics 2nd ed. 1982 (zero-order infusion) — pk-reference A2
    expect(r.outcome).toBe('targets-met');
    for (const c of r.candidates) {
      const css = c.dailyDose / 24 / 4.2;
      expect(relErr(c.steadyState.css!, css)).toBeLessThan(EXACT);
      expect(relErr(c.steadyState.auc24, css * 24)).toBeLessThan(EXACT);
      expect(c.infusionRate).toBeCloseTo(c.dailyDose / 24, 12);
      expect(c.infusionRate!).toBeLessThanOrEqual(1000);
    }
    const best = r.candidates[0]!;
    expect(best.steadyState.css!).toBeGreaterThanOrEqual(20);
    expect(best.steadyState.css!).toBeLessThanOrEqual(25);
    // 20 days of constant infusion (β half-life ≈ 14 h: > 30 half-lives).
    const T = 480;
    const sim = simulate({
      model: TWO,
      parameters: vanc,
      doses: [{ time: 0, amount: (best.dailyDose / 24) * T, route: 'infusion', duration: T }],
      outputTimes: [T - 0.001],
    });
    expect(relErr(sim.concentrations[0]!, best.steadyState.css!)).toBeLessThan(RK4_SS_TOL);
  });

  it('the loading dose is V·Css (Vss for two compartments), capped, and the first-day AUC matches RK4', () => {
    const best = r.candidates[0]!;
    const ld = best.loadingDose!;
    expect(ld.amount).toBeLessThanOrEqual(3000);
    expect(Math.abs(ld.amount - best.steadyState.css! * 80)).toBeLessThanOrEqual(125);
    expect(best.firstMaintenanceTime).toBe(ld.infusionDuration);
    const sim = simulate({
      model: TWO,
      parameters: vanc,
      doses: best.schedule,
      outputTimes: [],
      aucWindows: [[0, 24]],
    });
    expect(relErr(sim.aucs[0]!, best.auc24FirstDay)).toBeLessThan(RK4_SS_TOL);
  });
});
