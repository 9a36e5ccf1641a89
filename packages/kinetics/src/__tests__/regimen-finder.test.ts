import { describe, expect, it } from 'vitest';
import { findRegimens, regimenPresets } from '../regimen/finder';
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
