/**
 * Level-validity check: for each measured level, how it sits relative to the doses actually given,
 * and which estimation methods it can feed, each with a reason a pharmacist can read.
 *
 * Rules (all configurable per drug; provenance beside each default):
 * - during an infusion: not for log-linear (pk-reference A5 needs post-infusion levels); Bayesian may use
 *   it because the model knows the infusion, with a caution about drawing from the infusion line;
 * - distribution phase: a level sooner than `distributionPhaseHours` after the end of the infusion is not
 *   post-distribution: not for log-linear; for Bayesian only with a model of ≥ 2 compartments;
 * - steady state: half-lives elapsed since the current regimen began (t/t½); a regimen change is any change
 *   of amount, infusion time or interval; steady state is taken as ≥ `steadyStateHalfLives`
 *   (1 − 2^(−n) of steady state: Gibaldi & Perrier, Pharmacokinetics 2nd ed. ch. 3 — from memory);
 * - missed dose: a gap between doses, or from the last dose to the level, longer than
 *   `missedDoseGapFactor` × the usual interval;
 * - early trough: a level labelled `trough` drawn more than `troughWindowHours` before the next dose was due.
 * The log-linear method (Sawchuk-Zaske) also needs a steady state or the first dose interval, no missed dose
 * in that interval, and a measurable concentration.
 */
import {
  lastDoseAtOrBefore,
  regimenStart,
  sortDoses,
  usualInterval,
  validateLevels,
} from './dose-history';
import type { DoseLike, EngineWarning, MeasuredLevel } from './types';

export interface LevelRules {
  readonly distributionPhaseHours: number;
  readonly troughWindowHours: number;
  readonly steadyStateHalfLives: number;
  readonly missedDoseGapFactor: number;
  /** Compartments of the model the Bayesian fit will use. */
  readonly compartments: 1 | 2;
}

/** Defaults, all `common practice` unless stated. */
export const levelRulesDefault: Readonly<LevelRules> = Object.freeze({
  distributionPhaseHours: 1,
  troughWindowHours: 1,
  steadyStateHalfLives: 4,
  missedDoseGapFactor: 1.5,
  compartments: 2,
});

/**
 * Per-drug defaults for the distribution phase (h after the end of the infusion).
 * vancomycin 1 h: common practice (from memory: the 2020 vancomycin consensus places the peak 1–2 h after the
 * end of infusion). Aminoglycosides 0.5 h: common practice. Phenytoin IV 1 h: from memory (≥ 0.5–1 h after IV
 * phenytoin, RCPA manual).
 */
export const levelRulesByDrug: Readonly<Record<string, Readonly<Partial<LevelRules>>>> =
  Object.freeze({
    vancomycin: Object.freeze({ distributionPhaseHours: 1, compartments: 2 as const }),
    gentamicin: Object.freeze({ distributionPhaseHours: 0.5, compartments: 1 as const }),
    tobramycin: Object.freeze({ distributionPhaseHours: 0.5, compartments: 1 as const }),
    amikacin: Object.freeze({ distributionPhaseHours: 0.5, compartments: 1 as const }),
    phenytoin: Object.freeze({ distributionPhaseHours: 1, compartments: 1 as const }),
  });

export interface MethodUse {
  readonly usable: boolean;
  readonly reason: string;
}

export interface LevelAssessment {
  /** Index in the caller's level array. */
  readonly level: number;
  readonly time: number;
  readonly value: number;
  /** Index (caller's dose array) of the last dose started before the level, or undefined. */
  readonly lastDose: number | undefined;
  /** h since the end of the last infusion/bolus; negative while an infusion is running. */
  readonly hoursSinceDoseEnd: number | undefined;
  readonly duringInfusion: boolean;
  readonly distributionPhase: boolean;
  /** Half-lives since the current regimen began, when a half-life was given. */
  readonly halfLivesSinceRegimenChange: number | undefined;
  readonly steadyState: boolean | undefined;
  readonly afterMissedDose: boolean;
  readonly earlyTrough: boolean;
  readonly belowLimit: boolean;
  readonly bayesian: MethodUse;
  readonly logLinear: MethodUse;
  /** One-word verdict for a table. */
  readonly verdict: 'both' | 'bayesian-only' | 'log-linear-only' | 'neither';
  readonly notes: EngineWarning[];
}

/**
 * Assess every level against the dose history.
 * @param input.halfLife h, population or fitted; without it steady state is not judged.
 * @param input.drug a key of `levelRulesByDrug`; `rules` override it.
 * @throws EngineError `invalid-input`, `no-levels` (validation as for the fit; levels before the first dose are
 *   assessed as "neither", not thrown).
 * @example assessLevels({ doses: [{ time: 0, amount: 1000, duration: 1 }], levels: [{ time: 0.5, value: 20 }] })[0].verdict // => 'bayesian-only'
 */
export function assessLevels(input: {
  readonly doses: readonly DoseLike[];
  readonly levels: readonly MeasuredLevel[];
  readonly halfLife?: number;
  readonly drug?: string;
  readonly rules?: Partial<LevelRules>;
}): LevelAssessment[] {
  const fn = 'assessLevels';
  const doses = sortDoses(fn, input.doses);
  validateLevels(fn, input.levels);
  const r: LevelRules = {
    ...levelRulesDefault,
    ...(input.drug ? (levelRulesByDrug[input.drug.toLowerCase()] ?? {}) : {}),
    ...(input.rules ?? {}),
  };
  const tau = usualInterval(doses);
  const t12 =
    input.halfLife !== undefined && input.halfLife > 0 && Number.isFinite(input.halfLife)
      ? input.halfLife
      : undefined;

  return input.levels.map((l, i): LevelAssessment => {
    const notes: EngineWarning[] = [];
    const pos = lastDoseAtOrBefore(doses, l.time);
    const belowLimit =
      l.blq === true || l.value === 0 || (l.lloq !== undefined && l.value < l.lloq);
    if (pos < 0) {
      const reason = `Drawn at ${l.time} h, before the first recorded dose (${doses[0]!.time} h): a baseline, not usable for estimation.`;
      notes.push({ code: 'before-first-dose', message: reason });
      return {
        level: i,
        time: l.time,
        value: l.value,
        lastDose: undefined,
        hoursSinceDoseEnd: undefined,
        duringInfusion: false,
        distributionPhase: false,
        halfLivesSinceRegimenChange: undefined,
        steadyState: undefined,
        afterMissedDose: false,
        earlyTrough: false,
        belowLimit,
        bayesian: { usable: false, reason },
        logLinear: { usable: false, reason },
        verdict: 'neither',
        notes,
      };
    }
    const d = doses[pos]!;
    const since = l.time - d.end;
    const duringInfusion = d.duration > 0 && l.time < d.end;
    const distributionPhase = !duringInfusion && since < r.distributionPhaseHours;
    if (duringInfusion) {
      notes.push({
        code: 'during-infusion',
        message: `Drawn ${(l.time - d.time).toFixed(2)} h into a ${d.duration} h infusion; check it was not taken from the infusion line.`,
      });
    } else if (distributionPhase) {
      notes.push({
        code: 'distribution-phase',
        message: `Drawn ${since.toFixed(2)} h after the end of the dose, inside the ${r.distributionPhaseHours} h distribution phase; not a post-distribution peak.`,
      });
    }
    const start = regimenStart(doses, pos);
    const onRegimen = l.time - doses[start]!.time;
    const halfLives = t12 !== undefined ? onRegimen / t12 : undefined;
    const steadyState = halfLives !== undefined ? halfLives >= r.steadyStateHalfLives : undefined;
    if (steadyState === false) {
      notes.push({
        code: 'not-steady-state',
        message: `${halfLives!.toFixed(1)} half-lives since the current regimen began (steady state taken as ≥ ${r.steadyStateHalfLives}); do not read it as a steady-state level.`,
      });
    }
    let afterMissedDose = false;
    if (tau !== undefined) {
      const limit = r.missedDoseGapFactor * tau;
      const prevGap = pos > 0 ? d.time - doses[pos - 1]!.time : 0;
      if (prevGap > limit || l.time - d.time > limit) {
        afterMissedDose = true;
        notes.push({
          code: 'after-missed-dose',
          message: `A gap of more than ${limit.toFixed(1)} h (${r.missedDoseGapFactor} × the usual ${tau} h interval) precedes this level: a dose appears to have been missed or delayed.`,
        });
      }
    }
    let earlyTrough = false;
    if (l.kind === 'trough') {
      const next = doses[pos + 1];
      const due = next ? next.time : tau !== undefined ? d.time + tau : undefined;
      if (due !== undefined && due - l.time > r.troughWindowHours) {
        earlyTrough = true;
        notes.push({
          code: 'early-trough',
          message: `Labelled a trough but drawn ${(due - l.time).toFixed(2)} h before the next dose (window ${r.troughWindowHours} h); it reads higher than a true trough. Use it with its actual time, not as a trough.`,
        });
      }
    }
    if (belowLimit)
      notes.push({
        code: 'below-limit',
        message: 'Below the assay limit: used as "below the limit" (censored), never as zero.',
      });

    let bayesian: MethodUse;
    if (distributionPhase && r.compartments === 1) {
      bayesian = {
        usable: false,
        reason: 'Inside the distribution phase, which a one-compartment model does not describe.',
      };
    } else if (duringInfusion) {
      bayesian = {
        usable: true,
        reason:
          'Usable: the model includes the running infusion; confirm the sample was not from the infusion line.',
      };
    } else if (belowLimit) {
      bayesian = { usable: true, reason: 'Usable as a censored (below-limit) observation.' };
    } else {
      bayesian = {
        usable: true,
        reason:
          'Usable: the Bayesian fit uses the actual dose and sample times, at steady state or not.',
      };
    }
    let logLinear: MethodUse;
    if (duringInfusion)
      logLinear = {
        usable: false,
        reason: 'Drawn during the infusion; the log-linear method needs post-infusion levels.',
      };
    else if (distributionPhase)
      logLinear = {
        usable: false,
        reason: 'Not post-distribution; a log-linear slope would overestimate elimination.',
      };
    else if (belowLimit)
      logLinear = {
        usable: false,
        reason: 'Not measurable; a log-linear slope needs a concentration above the assay limit.',
      };
    else if (afterMissedDose)
      logLinear = {
        usable: false,
        reason: 'Follows a missed or delayed dose; the regular-interval equations do not apply.',
      };
    else if (pos > 0 && steadyState === false)
      logLinear = {
        usable: false,
        reason:
          'Not at steady state and not after the first dose; only Bayesian estimation handles this.',
      };
    else if (pos > 0 && steadyState === undefined)
      logLinear = {
        usable: true,
        reason: 'Usable if the regimen is at steady state (no half-life given to check).',
      };
    else
      logLinear = {
        usable: true,
        reason:
          pos === 0
            ? 'Usable with the first-dose form (nothing left from earlier doses).'
            : 'Usable: post-distribution, at steady state.',
      };

    const verdict = bayesian.usable
      ? logLinear.usable
        ? 'both'
        : 'bayesian-only'
      : logLinear.usable
        ? 'log-linear-only'
        : 'neither';
    return {
      level: i,
      time: l.time,
      value: l.value,
      lastDose: d.index,
      hoursSinceDoseEnd: since,
      duringInfusion,
      distributionPhase,
      halfLivesSinceRegimenChange: halfLives,
      steadyState,
      afterMissedDose,
      earlyTrough,
      belowLimit,
      bayesian,
      logLinear,
      verdict,
      notes,
    };
  });
}
