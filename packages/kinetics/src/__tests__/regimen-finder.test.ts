import { describe, expect, it } from 'vitest';
import { findRegimens, practicalityOf, regimenPresets } from '../regimen/finder';
import { individualParameters } from '../library/individual';
import { vancomycinGoti2018 } from '../library/drug-models';
import { targetDistance, targetsMet } from '../regimen/targets';
import { simulate } from '../simulate';
import type { Dose, ModelStructure } from '../types';

const twoCmt: ModelStructure = { compartments: 2, elimination: 'linear' };
// Vancomycin-like patient after a fit (common practice magnitudes).
const parameters = { CL: 4.2, V1: 35, Q: 6, V2: 45 };
// Target: AUC24 400–600 mg·h/L (Rybak MJ et al. Am J Health-Syst Pharm 2020;77:835).
const target = { auc24: { min: 400, max: 600 } };

describe('regimen/finder findRegimens', () => {
  it('the best vancomycin candidate meets AUC24 400–600 when re-simulated independently by RK4 `simulate`', () => {
    const r = findRegimens({
      model: twoCmt,
      parameters,
      target,
      options: { ...regimenPresets.vancomycin },
    });
    expect(r.outcome).toBe('targets-met');
    const best = r.candidates[0]!;
    expect(best.allTargetsMet).toBe(true);
    expect(best.amount % 250).toBe(0);
    // Independent check: ≥ 20 days of the regimen by RK4; AUC over the last full interval scaled to 24 h.
    const doses: Dose[] = [];
    const nDoses = Math.ceil(480 / best.interval) + 1;
    for (let i = 0; i < nDoses; i++)
      doses.push({
        time: i * best.interval,
        amount: best.amount,
        route: 'infusion',
        duration: best.infusionDuration,
      });
    const tLast = doses[nDoses - 1]!.time; // start of the last dose = end of the previous interval
    const tPrev = tLast - best.interval;
    const sim = simulate({
      model: twoCmt,
      parameters,
      doses,
      outputTimes: [tLast, tPrev + best.infusionDuration + 1],
      aucWindows: [[tPrev, tLast]],
    });
    const auc24 = (sim.aucs[0]! * 24) / best.interval;
    expect(auc24).toBeGreaterThanOrEqual(400);
    expect(auc24).toBeLessThanOrEqual(600);
    expect(Math.abs(auc24 / best.steadyState.auc24 - 1)).toBeLessThan(1e-4);
    // Steady-state trough = the concentration at the start of a dose (right-continuous: no infusion yet);
    // vancomycin preset peak = 1 h after the end of the infusion.
    expect(Math.abs(sim.concentrations[0]! / best.steadyState.trough - 1)).toBeLessThan(1e-4);
    expect(Math.abs(sim.concentrations[1]! / best.steadyState.peak - 1)).toBeLessThan(1e-4);
  });

  it('respects the infusion-rate cap, dose caps and rounding', () => {
    const r = findRegimens({
      model: twoCmt,
      parameters,
      target,
      options: { maxInfusionRate: 1000, maxCandidates: 200 },
    });
    for (const c of r.candidates) {
      expect(c.amount / c.infusionDuration).toBeLessThanOrEqual(1000 + 1e-9);
      expect(c.amount).toBeLessThanOrEqual(3000);
      expect(c.dailyDose).toBeLessThanOrEqual(4500 + 1e-9);
      expect(c.amount % 250).toBe(0);
    }
  });

  it('ranks met candidates first, then closeness, then fewer daily doses', () => {
    const r = findRegimens({ model: twoCmt, parameters, target, options: { maxCandidates: 200 } });
    const firstUnmet = r.candidates.findIndex((c) => !c.allTargetsMet);
    if (firstUnmet >= 0)
      expect(r.candidates.slice(firstUnmet).every((c) => !c.allTargetsMet)).toBe(true);
    const met = r.candidates.filter((c) => c.allTargetsMet);
    for (let i = 1; i < met.length; i++)
      expect(Math.floor(met[i]!.distance / 0.1)).toBeGreaterThanOrEqual(
        Math.floor(met[i - 1]!.distance / 0.1),
      );
  });

  describe('usual practice ranks before unusual intervals and dose sizes (vancomycin preset)', () => {
    // Typical adult, 80 kg, not on haemodialysis: Goti 2018 model of the library at several CrCl.
    const goti = (crcl: number) =>
      individualParameters(vancomycinGoti2018, { CRCL: crcl, WT: 80, HD: 0 }).parameters;
    const search = (crcl: number) =>
      findRegimens({
        model: twoCmt,
        parameters: goti(crcl),
        target,
        options: { ...regimenPresets.vancomycin, maxCandidates: 200 },
      });

    it.each([54, 90, 120])(
      'CrCl %i mL/min: the first candidate is every 12 or 24 h, ≤ 2000 mg, in range',
      (crcl) => {
        const r = search(crcl);
        const best = r.candidates[0]!;
        expect(best.allTargetsMet).toBe(true);
        expect([12, 24]).toContain(best.interval);
        expect(best.amount).toBeLessThanOrEqual(2000);
        expect(best.usualPractice).toBe(true);
        expect(best.practicalityNotes).toEqual([]);
        // Among regimens in range, every usual one comes before any unusual one.
        const met = r.candidates.filter((c) => c.allTargetsMet);
        const firstUnusual = met.findIndex((c) => !c.usualPractice);
        expect(firstUnusual).toBeGreaterThan(0);
        expect(met.slice(firstUnusual).every((c) => !c.usualPractice)).toBe(true);
        // Before this rule the CrCl 54 and 90 searches put an every-36 h regimen first.
        const unusual = met[firstUnusual]!;
        expect(unusual.practicalityNotes.length).toBeGreaterThan(0);
      },
    );

    it('poor renal function (CrCl 10): no usual regimen meets the target, so a long interval leads, with its reason', () => {
      const r = search(10);
      const best = r.candidates[0]!;
      expect(best.allTargetsMet).toBe(true);
      expect(best.interval).toBeGreaterThan(24);
      expect(best.usualPractice).toBe(false);
      expect(best.practicalityNotes.join(' ')).toMatch(
        /outside the usual intervals \(12 h, 24 h\)/,
      );
      // The smallest usual regimen (500 mg every 24 h) over-shoots: AUC24 = dose/CL above 600.
      expect(r.candidates.some((c) => c.usualPractice && c.allTargetsMet)).toBe(false);
    });

    it('practicalityOf names each reason and ignores continuous infusions', () => {
      const o = { preferredIntervals: [12, 24], usualMaxSingleDose: 2000 };
      expect(
        practicalityOf({ amount: 2500, interval: 36, regimenKind: 'intermittent-infusion' }, o)
          .practicalityNotes,
      ).toEqual([
        'Every 36 h is outside the usual intervals (12 h, 24 h).',
        'A single dose of 2500 mg is above the usual maintenance maximum of 2000 mg.',
      ]);
      expect(
        practicalityOf({ amount: 1000, interval: 12, regimenKind: 'intermittent-infusion' }, o),
      ).toEqual({ usualPractice: true, practicalityNotes: [] });
      expect(
        practicalityOf({ amount: 3000, interval: 24, regimenKind: 'continuous-infusion' }, o)
          .usualPractice,
      ).toBe(true);
      // No preference configured: everything is usual.
      expect(
        practicalityOf(
          { amount: 3000, interval: 48, regimenKind: 'intermittent-infusion' },
          { preferredIntervals: [], usualMaxSingleDose: 0 },
        ).usualPractice,
      ).toBe(true);
    });

    it('refuses malformed preferences with the field named', () => {
      expect(() =>
        findRegimens({ model: twoCmt, parameters, target, options: { preferredIntervals: [0] } }),
      ).toThrow(/options\.preferredIntervals/);
      expect(() =>
        findRegimens({ model: twoCmt, parameters, target, options: { usualMaxSingleDose: -1 } }),
      ).toThrow(/options\.usualMaxSingleDose/);
    });
  });

  it('adds a capped loading dose and reports the first-day AUC', () => {
    const r = findRegimens({
      model: twoCmt,
      parameters,
      target,
      options: { loadingDose: { enabled: true, cap: 3000 } },
    });
    const c = r.candidates.find((x) => x.loadingDose)!;
    expect(c.loadingDose!.amount).toBeLessThanOrEqual(3000);
    expect(c.firstMaintenanceTime).toBe(c.interval);
    const sim = simulate({
      model: twoCmt,
      parameters,
      doses: c.schedule,
      outputTimes: [],
      aucWindows: [[0, 24]],
    });
    expect(Math.abs(sim.aucs[0]! / c.auc24FirstDay - 1)).toBeLessThan(1e-4);
  });

  it('combined peak/MIC and trough targets for an aminoglycoside-like patient', () => {
    // Peak/MIC ≥ 10 (Int J Antimicrob Agents 2002 review, as cited in pk-reference E2) and trough < 1 mg/L (common practice).
    const p = { CL: 5, V1: 20 };
    const r = findRegimens({
      model: { compartments: 1, elimination: 'linear' },
      parameters: p,
      target: { peakToMic: { min: 10, mic: 1.5 }, trough: { max: 1 } },
      options: { ...regimenPresets.gentamicin },
    });
    const best = r.candidates[0]!;
    expect(best.allTargetsMet).toBe(true);
    expect(best.steadyState.peak / 1.5).toBeGreaterThanOrEqual(10);
    expect(best.steadyState.trough).toBeLessThanOrEqual(1);
  });

  it('refuses a target with nothing in it and a Michaelis-Menten model', () => {
    expect(() => findRegimens({ model: twoCmt, parameters, target: {} })).toThrow(
      /at least one of/,
    );
    expect(() =>
      findRegimens({
        model: { compartments: 1, elimination: 'michaelis-menten' },
        parameters: { V1: 50, Vmax: 20, Km: 4 },
        target,
      }),
    ).toThrow(/Michaelis-Menten/);
  });
});

describe('regimen/targets', () => {
  it('targetDistance is 0 at the centre, 1 at the edge; targetsMet reports each', () => {
    expect(targetDistance({ auc24: 500, peak: 0, trough: 0 }, target)).toBe(0);
    expect(targetDistance({ auc24: 600, peak: 0, trough: 0 }, target)).toBeCloseTo(1, 12);
    expect(targetsMet({ auc24: 399, peak: 0, trough: 0 }, target).each.auc24).toBe(false);
  });
});
