import { describe, expect, it } from 'vitest';
import { assessLevels, levelRulesByDrug } from '../estimation/level-validity';

// Vancomycin-like history: 1000 mg over 1 h every 12 h (q12h), 6 doses; t½ 8 h (common practice ranges).
const doses = Array.from({ length: 6 }, (_, i) => ({ time: 12 * i, amount: 1000, duration: 1 }));

describe('estimation/level-validity assessLevels', () => {
  it('assessLevels flags a level drawn during the infusion as Bayesian-only', () => {
    const [a] = assessLevels({
      doses,
      levels: [{ time: 60.5, value: 30 }],
      halfLife: 8,
      drug: 'vancomycin',
    });
    expect(a!.duringInfusion).toBe(true);
    expect(a!.verdict).toBe('bayesian-only');
    expect(a!.logLinear.reason).toMatch(/during the infusion/);
    expect(a!.hoursSinceDoseEnd).toBeCloseTo(-0.5, 12);
  });

  it('uses the per-drug distribution phase (vancomycin 1 h, aminoglycosides 0.5 h; common practice)', () => {
    expect(levelRulesByDrug.vancomycin!.distributionPhaseHours).toBe(1);
    expect(levelRulesByDrug.gentamicin!.distributionPhaseHours).toBe(0.5);
    const lv = [{ time: 61.75, value: 25 }];
    expect(
      assessLevels({ doses, levels: lv, halfLife: 8, drug: 'vancomycin' })[0]!.distributionPhase,
    ).toBe(true);
    expect(
      assessLevels({ doses, levels: lv, halfLife: 8, drug: 'gentamicin' })[0]!.distributionPhase,
    ).toBe(false);
  });

  it('counts half-lives since the last regimen change and judges steady state', () => {
    const changed = [
      ...doses,
      { time: 72, amount: 1500, duration: 1.5 },
      { time: 84, amount: 1500, duration: 1.5 },
    ];
    const [a] = assessLevels({
      doses: changed,
      levels: [{ time: 95.5, value: 12, kind: 'trough' }],
      halfLife: 8,
    });
    expect(a!.halfLivesSinceRegimenChange).toBeCloseTo(23.5 / 8, 12);
    expect(a!.steadyState).toBe(false);
    expect(a!.logLinear.usable).toBe(false);
    expect(a!.bayesian.usable).toBe(true);
    expect(a!.notes.map((n) => n.code)).toContain('not-steady-state');
  });

  it('flags an early trough (labelled trough, drawn 3 h before the next dose)', () => {
    const [a] = assessLevels({
      doses,
      levels: [{ time: 57, value: 14, kind: 'trough' }],
      halfLife: 8,
    });
    expect(a!.earlyTrough).toBe(true);
    expect(a!.notes.find((n) => n.code === 'early-trough')!.message).toMatch(
      /3\.00 h before the next dose/,
    );
  });

  it('flags a level after a missed dose', () => {
    const missed = doses.filter((d) => d.time !== 48);
    const [a] = assessLevels({ doses: missed, levels: [{ time: 70, value: 10 }], halfLife: 8 });
    expect(a!.afterMissedDose).toBe(true);
    expect(a!.logLinear.usable).toBe(false);
  });

  it('marks a below-limit level as censored for Bayesian, not usable for log-linear', () => {
    const [a] = assessLevels({
      doses,
      levels: [{ time: 70, value: 0, blq: true, lloq: 2 }],
      halfLife: 8,
    });
    expect(a!.belowLimit).toBe(true);
    expect(a!.bayesian.reason).toMatch(/censored/);
    expect(a!.logLinear.usable).toBe(false);
  });

  it('a post-distribution steady-state level is usable for both', () => {
    const [a] = assessLevels({
      doses,
      levels: [{ time: 62, value: 25 }],
      halfLife: 8,
      drug: 'vancomycin',
    });
    expect(a!.verdict).toBe('both');
  });

  it('a level before the first dose is usable for neither', () => {
    const [a] = assessLevels({
      doses: doses.map((d) => ({ ...d, time: d.time + 5 })),
      levels: [{ time: 1, value: 0.5 }],
    });
    expect(a!.verdict).toBe('neither');
  });
});
