/**
 * Two-level log-linear method for a one-compartment drug given by intermittent infusion.
 *
 * Source: Sawchuk RJ, Zaske DE. Pharmacokinetics of dosing regimens which utilize multiple intravenous
 * infusions: gentamicin in burn patients. J Pharmacokinet Biopharm 1976;4:183–195 (as presented in
 * Bauer LA, Applied Clinical Pharmacokinetics, ch. 4 — from memory). Equations (T infusion time, τ interval,
 * R0 = dose/T, C1 at t1 and C2 at t2 both after the end of the infusion, same interval):
 *   k = ln(C1/C2)/(t2 − t1)
 *   Cmax = C1·e^(k(t1 − tEnd))                          (back-extrapolated to the end of the infusion)
 *   V = R0(1 − e^(−kT)) / (k·[Cmax − Cmin·e^(−kT)])
 *     steady-state form: Cmin = Cmax·e^(−k(τ − T))      (pre-dose = end-of-interval trough)
 *     first-dose form:   Cmin = 0
 *     measured form:     Cmin = the level measured just before the sampled dose
 *   CL = k·V,  t½ = ln2/k
 * AUC24 at steady state by the first-order equations (Pai MP, Neely M, Rodvold KA, Lodise TP.
 * Adv Drug Deliv Rev 2014;77:50–57): AUCτ = T(Cmax + Cmin)/2 + (Cmax − Cmin)/k, AUC24 = AUCτ·24/τ.
 */
import { EngineError } from '../errors';
import { lastDoseAtOrBefore, regimenStart, sortDoses, validateLevels } from './dose-history';
import type { DoseLike, EngineWarning, MeasuredLevel } from './types';

export type TwoLevelForm = 'auto' | 'steady-state' | 'first-dose' | 'measured-predose';

export interface TwoLevelOptions {
  /** Which V equation to use; `auto` = first-dose form for the first dose, else steady-state form. */
  readonly form: TwoLevelForm;
  /** Measured pre-dose level (mg/L) before the sampled dose, for the `measured-predose` form. */
  readonly predoseLevel?: number;
  /** Dosing interval τ (h) when it cannot be read from the dose history. */
  readonly interval?: number;
  /**
   * Hours after the end of the infusion before a level counts as post-distribution.
   * 0.5 h suits aminoglycosides, 1 h vancomycin (common practice).
   */
  readonly distributionPhaseHours: number;
  /** Half-lives of an unchanged regimen before the steady-state form is trusted (common practice: 4–5). */
  readonly steadyStateHalfLives: number;
}

export const twoLevelDefaultOptions: Readonly<TwoLevelOptions> = Object.freeze({
  form: 'auto',
  distributionPhaseHours: 0.5,
  steadyStateHalfLives: 4,
});

export interface TwoLevelRefusal {
  readonly code:
    | 'not-two-levels'
    | 'same-time'
    | 'not-falling'
    | 'non-positive-level'
    | 'during-infusion'
    | 'distribution-phase'
    | 'different-intervals'
    | 'no-interval'
    | 'no-predose-level'
    | 'not-infusion';
  readonly message: string;
}

export type TwoLevelResult =
  | {
      readonly outcome: 'estimated';
      /** Elimination rate constant, 1/h. */
      readonly k: number;
      /** Volume, L. */
      readonly V: number;
      /** Clearance, L/h. */
      readonly CL: number;
      /** h. */
      readonly halfLife: number;
      /** Back-extrapolated concentration at the end of the infusion, mg/L. */
      readonly cmax: number;
      /** Pre-dose concentration used in the V equation, mg/L. */
      readonly cmin: number;
      readonly form: Exclude<TwoLevelForm, 'auto'>;
      /** τ (h) of the sampled interval, when known. */
      readonly interval: number | undefined;
      /** Steady-state AUC24 (mg·h/L) by the first-order equations, when τ is known. */
      readonly auc24: number | undefined;
      /** Index (in the caller's dose array) of the dose whose interval was sampled. */
      readonly sampledDose: number;
      readonly warnings: EngineWarning[];
    }
  | {
      readonly outcome: 'refused';
      readonly refusals: TwoLevelRefusal[];
      readonly warnings: EngineWarning[];
    };

/**
 * Estimate k, V, CL and t½ from two post-distribution levels in one dosing interval (Sawchuk-Zaske).
 * Levels that do not allow the method give `outcome: 'refused'` with every reason; malformed input throws.
 * @throws EngineError `invalid-input`, `no-levels`, `level-before-first-dose`.
 * @example
 * twoLevelEstimate({ doses: [{ time: 0, amount: 1000, duration: 1 }],
 *   levels: [{ time: 2, value: 20 }, { time: 10, value: 10 }] }) // => { outcome: 'estimated', k: 0.0866…, … }
 */
export function twoLevelEstimate(input: {
  readonly doses: readonly DoseLike[];
  readonly levels: readonly MeasuredLevel[];
  readonly options?: Partial<TwoLevelOptions>;
}): TwoLevelResult {
  const fn = 'twoLevelEstimate';
  const o: TwoLevelOptions = { ...twoLevelDefaultOptions, ...(input.options ?? {}) };
  const doses = sortDoses(fn, input.doses);
  validateLevels(fn, input.levels, doses[0]!.time);
  const warnings: EngineWarning[] = [];
  const refusals: TwoLevelRefusal[] = [];
  if (input.levels.length !== 2) {
    refusals.push({
      code: 'not-two-levels',
      message: `Exactly two levels are needed; ${input.levels.length} were given.`,
    });
    return { outcome: 'refused', refusals, warnings };
  }
  const [a, b] = [...input.levels].sort((x, y) => x.time - y.time) as [
    MeasuredLevel,
    MeasuredLevel,
  ];
  if (a.time === b.time) {
    refusals.push({
      code: 'same-time',
      message: `Both levels were drawn at ${a.time} h; the method needs two different times.`,
    });
  }
  if (a.value <= 0 || b.value <= 0 || a.blq || b.blq) {
    refusals.push({
      code: 'non-positive-level',
      message:
        'A level is zero or below the assay limit; a log-linear slope needs two measurable concentrations.',
    });
  } else if (a.time !== b.time && b.value >= a.value) {
    refusals.push({
      code: 'not-falling',
      message: `The later level (${b.value} mg/L at ${b.time} h) is not lower than the earlier (${a.value} mg/L at ${a.time} h); elimination cannot be estimated from rising or flat concentrations.`,
    });
  }
  const pa = lastDoseAtOrBefore(doses, a.time);
  const pb = lastDoseAtOrBefore(doses, b.time);
  if (pa !== pb) {
    refusals.push({
      code: 'different-intervals',
      message: `The levels at ${a.time} h and ${b.time} h fall in different dosing intervals (a dose was started at ${doses[pb]!.time} h in between).`,
    });
  }
  const dose = doses[pa]!;
  if (dose.duration <= 0) {
    refusals.push({
      code: 'not-infusion',
      message:
        'The sampled dose is not an infusion; this form of the method is for intermittent infusions.',
    });
  }
  for (const l of [a, b]) {
    const d = doses[lastDoseAtOrBefore(doses, l.time)]!;
    if (l.time < d.end) {
      refusals.push({
        code: 'during-infusion',
        message: `The level at ${l.time} h was drawn during the infusion (${d.time}–${d.end} h); only post-infusion levels can be used.`,
      });
    } else if (l.time - d.end < o.distributionPhaseHours) {
      refusals.push({
        code: 'distribution-phase',
        message: `The level at ${l.time} h was drawn ${(l.time - d.end).toFixed(2)} h after the end of the infusion, inside the ${o.distributionPhaseHours} h distribution phase.`,
      });
    }
  }
  const next = doses[pa + 1];
  const interval = next
    ? next.time - dose.time
    : pa > 0
      ? dose.time - doses[pa - 1]!.time
      : o.interval;
  let form: Exclude<TwoLevelForm, 'auto'> =
    o.form === 'auto' ? (pa === 0 ? 'first-dose' : 'steady-state') : o.form;
  if (o.form === 'auto' && pa > 0 && o.predoseLevel !== undefined) form = 'measured-predose';
  if (form === 'steady-state' && interval === undefined) {
    refusals.push({
      code: 'no-interval',
      message:
        'The steady-state form needs the dosing interval; give a next dose or options.interval.',
    });
  }
  if (
    form === 'measured-predose' &&
    (o.predoseLevel === undefined || !Number.isFinite(o.predoseLevel) || o.predoseLevel < 0)
  ) {
    refusals.push({
      code: 'no-predose-level',
      message: 'The measured-predose form needs options.predoseLevel (mg/L).',
    });
  }
  if (refusals.length > 0) return { outcome: 'refused', refusals, warnings };

  const T = dose.duration;
  const k = Math.log(a.value / b.value) / (b.time - a.time);
  const cmax = a.value * Math.exp(k * (a.time - dose.end));
  const cmin =
    form === 'first-dose'
      ? 0
      : form === 'measured-predose'
        ? o.predoseLevel!
        : cmax * Math.exp(-k * (interval! - T));
  const R0 = dose.amount / T;
  const V = (R0 * (1 - Math.exp(-k * T))) / (k * (cmax - cmin * Math.exp(-k * T)));
  const CL = k * V;
  const halfLife = Math.LN2 / k;
  if (!(V > 0) || !Number.isFinite(V)) {
    return {
      outcome: 'refused',
      refusals: [
        {
          code: 'not-falling',
          message:
            'The pre-dose level is too high for these levels; the volume would not be positive.',
        },
      ],
      warnings,
    };
  }
  if (form === 'first-dose' && pa > 0) {
    warnings.push({
      code: 'earlier-doses-ignored',
      message:
        'The first-dose form assumes nothing was left from earlier doses, but earlier doses exist.',
    });
  }
  if (form === 'steady-state') {
    const start = regimenStart(doses, pa);
    const hoursOnRegimen = dose.time - doses[start]!.time;
    const halfLives = hoursOnRegimen / halfLife;
    if (halfLives < o.steadyStateHalfLives) {
      warnings.push({
        code: 'not-steady-state',
        message: `The regimen had run ${halfLives.toFixed(1)} half-lives before the sampled dose (fewer than ${o.steadyStateHalfLives}); the steady-state form may misestimate V.`,
      });
    }
  }
  if (b.time - a.time < halfLife / 2) {
    warnings.push({
      code: 'levels-close-together',
      message: `The levels are ${(b.time - a.time).toFixed(2)} h apart, less than half a half-life; k is sensitive to assay error.`,
    });
  }
  let auc24: number | undefined;
  if (interval !== undefined) {
    const cmaxSs =
      form === 'steady-state'
        ? cmax
        : ((R0 / CL) * (1 - Math.exp(-k * T))) / (1 - Math.exp(-k * interval));
    const cminSs = cmaxSs * Math.exp(-k * (interval - T));
    auc24 = ((T * (cmaxSs + cminSs)) / 2 + (cmaxSs - cminSs) / k) * (24 / interval);
  }
  return {
    outcome: 'estimated',
    k,
    V,
    CL,
    halfLife,
    cmax,
    cmin,
    form,
    interval,
    auc24,
    sampledDose: dose.index,
    warnings,
  };
}

/**
 * Regimen for a target steady-state peak (end of infusion) and trough (pre-dose), one compartment,
 * intermittent infusion (design equations: Sawchuk & Zaske 1976, as presented in Bauer ch. 4 — from memory):
 *   τ = ln(Cmax/Cmin)/k + T;  R0 = Cmax·k·V·(1 − e^(−kτ))/(1 − e^(−kT));  dose = R0·T.
 * With `practicalIntervals` the exact τ is replaced by the nearest practical one that does not exceed
 * it, the dose recomputed for the target peak and rounded to `amountStep`; predicted peak and trough of
 * the rounded regimen are returned (steady-state formulas, pk-reference A5).
 * @throws EngineError `invalid-input` for non-positive inputs or peak ≤ trough.
 * @example designPeakTroughRegimen({ k: 0.2, V: 20, targetPeak: 8, targetTrough: 1, infusionDuration: 0.5 }).interval // => 10.897…
 */
export function designPeakTroughRegimen(input: {
  readonly k: number;
  readonly V: number;
  readonly targetPeak: number;
  readonly targetTrough: number;
  readonly infusionDuration: number;
  readonly practicalIntervals?: readonly number[];
  readonly amountStep?: number;
}): {
  readonly interval: number;
  readonly dose: number;
  readonly practical?: {
    readonly interval: number;
    readonly dose: number;
    readonly peak: number;
    readonly trough: number;
  };
} {
  const fn = 'designPeakTroughRegimen';
  for (const f of ['k', 'V', 'targetPeak', 'targetTrough', 'infusionDuration'] as const) {
    if (!Number.isFinite(input[f]) || input[f] <= 0) {
      throw new EngineError('invalid-input', `${fn}: ${f} must be a positive number`, f);
    }
  }
  const { k, V, targetPeak: cmax, targetTrough: cmin, infusionDuration: T } = input;
  if (cmax <= cmin)
    throw new EngineError(
      'invalid-input',
      `${fn}: targetPeak must exceed targetTrough`,
      'targetPeak',
    );
  const doseFor = (tau: number): number =>
    ((cmax * k * V * (1 - Math.exp(-k * tau))) / (1 - Math.exp(-k * T))) * T;
  const interval = Math.log(cmax / cmin) / k + T;
  const exact = { interval, dose: doseFor(interval) };
  if (!input.practicalIntervals || input.practicalIntervals.length === 0) return exact;
  const fits = [...input.practicalIntervals].filter((t) => t > T).sort((x, y) => x - y);
  const tau = [...fits].reverse().find((t) => t <= interval) ?? fits[0];
  if (tau === undefined) return exact;
  const step = input.amountStep ?? 1;
  const dose = Math.max(step, Math.round(doseFor(tau) / step) * step);
  const R0 = dose / T;
  const peak = ((R0 / (k * V)) * (1 - Math.exp(-k * T))) / (1 - Math.exp(-k * tau));
  return {
    ...exact,
    practical: { interval: tau, dose, peak, trough: peak * Math.exp(-k * (tau - T)) },
  };
}
