import { Solver } from 'odex';
import { describe, expect, it } from 'vitest';
import { findRegimens, regimenPresets, type RegimenCandidate } from '../regimen/finder';
import { michaelisMentenRegimenSteadyState } from '../regimen/michaelis-menten-steady-state';
import { simulate } from '../simulate';
import type { Dose, ModelStructure, PkParameters } from '../types';
import { relErr } from './helpers';

const MM1: ModelStructure = { compartments: 1, elimination: 'michaelis-menten' };
// Invented adult, 70 kg, near the population values of pk-reference D3 (Vmax 415 mg/day, Km 5.7 mg/L,
// V 0.7 L/kg, oral F 0.859) with a placeholder ka 0.3 /h (as the library).
const patient: PkParameters = { V1: 49, Vmax: 415 / 24, Km: 5.7, ka: 0.3, F: 0.859 };
const S = 0.92; // phenytoin sodium salt factor (pk-reference A8)
const target = { css: { min: 10, max: 20 } }; // total phenytoin 10–20 mg/L (pk-reference E3)

/** Agreement required between closed-form Css and long ODE runs (the brief's 1e-3 relative). */
const STEADY_STATE_REL_TOL = 1e-3;

const phenytoinOral = (parameters: PkParameters = patient) =>
  findRegimens({
    model: MM1,
    parameters,
    target,
    regimenKind: 'oral',
    options: { ...regimenPresets.phenytoin, maxCandidates: 100 },
  });

/** Active input rate of a candidate, mg/h: R = S·F·dose/τ (pk-reference A8). */
const rateOf = (c: RegimenCandidate, F: number): number => (S * F * c.amount) / c.interval;

/**
 * odex 2.0.4 (Hairer's ODEX extrapolation code) on dC/dt = R/V − Vmax·C/(V(Km + C)) from C = 0,
 * rtol = atol = 1e-12 (pk-reference A8 ODE).
 */
function odexConstantInput(R: number, p: PkParameters, tEnd: number): number {
  const solver = new Solver(1);
  solver.relativeTolerance = 1e-12;
  solver.absoluteTolerance = 1e-12;
  solver.maxSteps = 1e6;
  const V = p.V1;
  const f = (_x: number, y: number[]): number[] => [
    R / V - (p.Vmax! * y[0]!) / (V * (p.Km! + y[0]!)),
  ];
  return solver.solve(f, 0, [0], tEnd).y[0]!;
}

describe('regimen/finder findRegimens({ model: Michaelis-Menten, regimenKind: "oral" }) (phenytoin)', () => {
  it('predicted Css equals Km·R/(Vmax − R), and a long RK4 run and odex of the constant input agree to 1e-3', () => {
    // Source: Winter ME, Basic Clinical Pharmacokinetics, phenytoin chapter (from memory) — pk-reference A8
    const r = phenytoinOral();
    expect(r.candidates.length).toBeGreaterThan(0);
    for (const c of r.candidates) {
      const R = rateOf(c, patient.F!);
      const css = (patient.Km! * R) / (patient.Vmax! - R);
      expect(relErr(c.steadyState.css!, css)).toBeLessThan(1e-12);
      expect(relErr(c.michaelisMenten!.css, css)).toBeLessThan(1e-12);
      expect(c.saltFactor).toBe(S);
      expect(c.activeSchedule[0]!.amount).toBeCloseTo(S * c.amount, 12);
    }
    const best = r.candidates[0]!;
    const R = rateOf(best, patient.F!);
    // Long runs of the constant input R from no drug: 40 × t90 leaves < 1e-6 of the approach.
    const tEnd = 40 * best.michaelisMenten!.time90Hours;
    const rk4 = simulate({
      model: MM1,
      parameters: patient,
      doses: [{ time: 0, amount: R * tEnd, route: 'infusion', duration: tEnd }],
      outputTimes: [tEnd],
      options: { estimateError: false },
    }).concentrations[0]!;
    expect(relErr(rk4, best.steadyState.css!)).toBeLessThan(STEADY_STATE_REL_TOL);
    expect(relErr(odexConstantInput(R, patient, tEnd), best.steadyState.css!)).toBeLessThan(
      STEADY_STATE_REL_TOL,
    );
  });

  it('interval peak/trough come from a converged steady state: an independent RK4 run from no drug reproduces them', () => {
    // Source: the same ODE (pk-reference A8) by RK4 `simulate`, 300 days of the regimen from C = 0.
    const r = phenytoinOral();
    for (const c of [r.candidates[0]!, r.candidates.find((x) => x.interval === 8)!]) {
      expect(c.michaelisMenten!.converged).toBe(true);
      const n = Math.ceil((300 * 24) / c.interval);
      const doses: Dose[] = Array.from({ length: n + 1 }, (_, i) => ({
        time: i * c.interval,
        amount: S * c.amount,
        route: 'oral',
      }));
      const tLast = n * c.interval; // the last dose starts here: the level just before it is the trough
      const sim = simulate({
        model: MM1,
        parameters: patient,
        doses,
        outputTimes: [tLast, tLast - c.interval + c.peakTime],
        aucWindows: [[tLast - c.interval, tLast]],
        options: { estimateError: false },
      });
      expect(relErr(sim.concentrations[0]!, c.steadyState.trough)).toBeLessThan(1e-5);
      expect(relErr(sim.concentrations[1]!, c.steadyState.peak)).toBeLessThan(1e-5);
      expect(relErr((sim.aucs[0]! * 24) / c.interval, c.steadyState.auc24)).toBeLessThan(1e-5);
      // Nonlinear elimination: the interval average is at or slightly above the constant-input Css (Jensen).
      expect(c.michaelisMenten!.simulatedAverage).toBeGreaterThanOrEqual(
        c.steadyState.css! * (1 - 1e-6),
      );
      expect(c.michaelisMenten!.averageVsCss).toBeLessThan(0.02);
    }
  });

  it('time to 90 % of steady state equals the A8 closed form, and an RK4 run crosses 0.9·Css there', () => {
    // Source: pk-reference A8, t90 = Km·V·(ln10·Vmax − 0.9·R)/(Vmax − R)² (exact integral of the ODE; the
    // textbook form of Winter ME, Basic Clinical Pharmacokinetics, phenytoin chapter, uses 2.3 — from memory)
    const best = phenytoinOral().candidates[0]!;
    const R = rateOf(best, patient.F!);
    const { Vmax, Km, V1 } = patient as Required<PkParameters>;
    const t90 = (Km * V1 * (Math.LN10 * Vmax - 0.9 * R)) / (Vmax - R) ** 2;
    expect(relErr(best.michaelisMenten!.time90Hours, t90)).toBeLessThan(1e-12);
    expect(best.michaelisMenten!.time90Days).toBeCloseTo(t90 / 24, 12);
    const textbook = (Km * V1 * (2.3 * Vmax - 0.9 * R)) / (Vmax - R) ** 2;
    expect(relErr(textbook, t90)).toBeLessThan(0.002);
    const css = best.steadyState.css!;
    const c = (t: number): number =>
      simulate({
        model: MM1,
        parameters: patient,
        doses: [{ time: 0, amount: R * t, route: 'infusion', duration: t }],
        outputTimes: [t],
        options: { estimateError: false },
      }).concentrations[0]!;
    expect(relErr(c(t90), 0.9 * css)).toBeLessThan(1e-5);
  });

  it('refuses every candidate with R ≥ Vmax (no steady state), with the reason, and never predicts it', () => {
    // Source: pk-reference A8 (Css valid only for R < Vmax) and G4.
    // IV continuous input without salt factor: 240 mg/day = 10 mg/h exactly equals Vmax 10 mg/h.
    const low: PkParameters = { V1: 49, Vmax: 10, Km: 5.7 };
    const r = findRegimens({
      model: MM1,
      parameters: low,
      target,
      regimenKind: 'continuous-infusion',
      options: { amountStep: 20, minAmount: 20, maxDailyDose: 400, maxCandidates: 100 },
    });
    const boundary = r.refused.find((x) => x.dailyDose === 240);
    expect(boundary?.code).toBe('no-steady-state');
    expect(boundary?.message).toMatch(/at or above Vmax/);
    for (const x of r.refused) expect(x.dailyDose / 24).toBeGreaterThanOrEqual(10);
    for (const c of r.candidates) {
      expect(c.dailyDose / 24).toBeLessThan(10);
      expect(Number.isFinite(c.steadyState.css!)).toBe(true);
    }
    expect(r.candidates.length + r.refused.length).toBe(20);
    expect(r.warnings.map((w) => w.code)).toContain('no-steady-state');
    // The same boundary through the steady-state helper.
    const h = michaelisMentenRegimenSteadyState(MM1, low, {
      amount: 240,
      interval: 24,
      route: 'continuous',
    });
    expect(h.outcome).toBe('no-steady-state');
  });

  it('the best candidate for an invented patient, re-simulated independently for 200 days, stays inside 10–20 mg/L', () => {
    // Invented patient: 82 kg, Vmax 7 mg/kg/day and Km 4 mg/L (teaching defaults, pk-reference D3), V 0.7 L/kg.
    const p: PkParameters = { V1: 0.7 * 82, Vmax: (7 * 82) / 24, Km: 4, ka: 0.3, F: 0.859 };
    const r = phenytoinOral(p);
    expect(r.outcome).toBe('targets-met');
    const best = r.candidates[0]!;
    expect(best.amount % 25).toBe(0);
    const n = Math.ceil((200 * 24) / best.interval);
    const doses: Dose[] = Array.from({ length: n + 1 }, (_, i) => ({
      time: i * best.interval,
      amount: S * best.amount,
      route: 'oral',
    }));
    const tLast = n * best.interval;
    const times = Array.from(
      { length: 97 },
      (_, i) => tLast - best.interval + (i * best.interval) / 96,
    );
    const sim = simulate({ model: MM1, parameters: p, doses, outputTimes: times });
    for (const c of sim.concentrations) {
      expect(c).toBeGreaterThanOrEqual(10);
      expect(c).toBeLessThanOrEqual(20);
    }
    expect(best.michaelisMenten!.time90Days).toBeGreaterThan(1);
  });

  it('IV intermittent phenytoin uses F = 1 and the rate cap; a Michaelis-Menten model without regimenKind is refused as before', () => {
    const r = findRegimens({
      model: MM1,
      parameters: patient,
      target,
      regimenKind: 'intermittent-infusion',
      options: { ...regimenPresets.phenytoin, maxCandidates: 100 },
    });
    for (const c of r.candidates) {
      expect(c.route).toBe('infusion');
      expect(c.amount / c.infusionDuration).toBeLessThanOrEqual(3000 + 1e-9);
      expect(c.michaelisMenten!.inputRate).toBeCloseTo((S * c.amount) / c.interval, 12);
    }
    expect(() => findRegimens({ model: MM1, parameters: patient, target })).toThrow(
      /Michaelis-Menten/,
    );
  });

  describe("loading dose to the regimen's own steady state", () => {
    // LD = V·(Cdesired − C0)/(S·F), Cdesired = the steady-state peak: Winter ME, Basic Clinical Pharmacokinetics, phenytoin chapter; Bauer LA,
    // Applied Clinical Pharmacokinetics, ch. 10 (both from memory).
    const search = (
      regimenKind: 'intermittent-infusion' | 'oral',
      extra: Record<string, unknown> = {},
    ) =>
      findRegimens({
        model: MM1,
        parameters: patient,
        target,
        regimenKind,
        options: {
          ...regimenPresets.phenytoin,
          loadingDose: { enabled: true, cap: 2000 },
          maxCandidates: 100,
          ...extra,
        },
      });

    it('IV: LD = V·Cpeak,ss/S rounded to 25 mg, infused no faster than 50 mg/min, and the first week stays in range', () => {
      const r = search('intermittent-infusion');
      const best = r.candidates[0]!;
      const ld = best.loadingDose!;
      expect(Math.abs(ld.amount - (patient.V1 * best.steadyState.peak) / S)).toBeLessThanOrEqual(
        12.5 + 1e-9,
      );
      expect(ld.amount % 25).toBe(0);
      expect(ld.amount / ld.infusionDuration).toBeLessThanOrEqual(3000 + 1e-9);
      expect(best.firstMaintenanceTime).toBe(best.interval);
      // Independent check: the first week of the schedule through RK4 `simulate` (loading dose, then the
      // maintenance doses every τ): every hour from the end of the loading infusion stays inside 10–20 mg/L,
      // while the same maintenance doses without it start below 10 mg/L.
      const week: Dose[] = [
        best.activeSchedule[0]!,
        ...Array.from({ length: Math.ceil(168 / best.interval) }, (_, i) => ({
          ...best.activeSchedule[1]!,
          time: best.firstMaintenanceTime + i * best.interval,
        })),
      ];
      const hours = Array.from({ length: 160 }, (_, i) => ld.infusionDuration + 1 + i);
      const loaded = simulate({ model: MM1, parameters: patient, doses: week, outputTimes: hours });
      expect(Math.min(...loaded.concentrations)).toBeGreaterThanOrEqual(10);
      expect(Math.max(...loaded.concentrations)).toBeLessThanOrEqual(20);
      const unloaded = simulate({
        model: MM1,
        parameters: patient,
        doses: week.slice(1),
        outputTimes: [best.firstMaintenanceTime + best.interval],
      });
      expect(unloaded.concentrations[0]!).toBeLessThan(10);
    });

    it('oral: the loading dose is split into portions of at most 400 mg every 2 h and uses F', () => {
      const best = search('oral').candidates[0]!;
      const ld = best.loadingDose!;
      expect(
        Math.abs(ld.amount - (patient.V1 * best.steadyState.peak) / (S * patient.F!)),
      ).toBeLessThanOrEqual(12.5 + 1e-9);
      const portions = best.schedule.filter((d) => d.time < best.firstMaintenanceTime);
      expect(portions.length).toBe(ld.portions);
      expect(portions.every((d) => d.amount <= 400)).toBe(true);
      expect(portions.reduce((t, d) => t + d.amount, 0)).toBe(ld.amount);
      expect(portions.map((d) => d.time)).toEqual(portions.map((_, i) => i * 2));
    });

    it('subtracts the concentration already present, and gives none when it reaches Css', () => {
      const none = search('intermittent-infusion').candidates[0]!;
      const part = search('intermittent-infusion', { currentConcentration: 5 }).candidates.find(
        (c) => c.amount === none.amount && c.interval === none.interval,
      )!;
      expect(
        Math.abs(none.loadingDose!.amount - part.loadingDose!.amount - (patient.V1 * 5) / S),
      ).toBeLessThanOrEqual(25 + 1e-9);
      const full = search('intermittent-infusion', { currentConcentration: 40 });
      const inRange = full.candidates.filter((c) => c.allTargetsMet);
      expect(inRange.length).toBeGreaterThan(0);
      expect(inRange.every((c) => c.loadingDose === undefined)).toBe(true);
      expect(inRange[0]!.warnings.map((w) => w.code)).toContain('no-loading-dose-needed');
    });

    it('caps the loading dose and says so', () => {
      const r = search('intermittent-infusion', { loadingDose: { enabled: true, cap: 500 } });
      const loaded = r.candidates.filter((c) => c.loadingDose);
      for (const c of loaded) expect(c.loadingDose!.amount).toBeLessThanOrEqual(500);
      expect(
        r.candidates.some((c) => c.warnings.some((w) => w.code === 'loading-dose-capped')),
      ).toBe(true);
    });
  });
});
