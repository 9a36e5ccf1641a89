/**
 * Regimen finder: enumerate practical intermittent-infusion regimens, predict their steady-state exposure
 * from a patient's (estimated or population) parameters, and rank them against a target.
 *
 * Predictions (linear models only, exact): steady-state peak and trough by the exponential-sum closed forms
 * (pk-reference A5/A6, `steadyStateConcentration`); AUC24 at steady state by the identity
 * AUC24,ss = F·daily dose/CL (pk-reference A7); the first-24 h AUC with a loading dose by exact integration of
 * the superposed doses (`superposedAuc`).
 * Loading dose (when asked): the maintenance dose × (steady-state peak / first-dose peak), rounded, capped —
 * so the first peak approximates the steady-state peak (for one compartment this is MD/(1 − e^(−kτ)),
 * Gibaldi & Perrier ch. 3 — from memory). First maintenance dose one interval after the loading dose starts.
 * Infusion time: the longer of `minInfusionDuration` and amount/`maxInfusionRate`, rounded up to
 * `durationStep`.
 * Ranking: all targets met first; then distance from the target centre (`targetDistance`) in bins of
 * `closenessResolution`; then fewer doses per day; then smaller daily dose.
 */
import { EngineError } from '../errors';
import type { Dose, ModelStructure, PkParameters } from '../types';
import type { EngineWarning } from '../estimation/types';
import {
  exponentialModel,
  singleDoseConcentration,
  steadyStateConcentration,
  superposedAuc,
} from './linear-response';
import {
  targetDistance,
  targetsMet,
  validateTarget,
  type Exposure,
  type ExposureTarget,
} from './targets';

export interface RegimenSearchOptions {
  /** Dose rounding, mg (vancomycin 250 mg: common practice, many protocols round to 250 mg). */
  readonly amountStep: number;
  readonly minAmount: number;
  readonly maxSingleDose: number;
  readonly maxDailyDose: number;
  /** Practical intervals, h. */
  readonly intervals: readonly number[];
  /** mg/h (vancomycin ≤ 1 g/h per the consensus summary; the US label is stricter — make it a site setting). */
  readonly maxInfusionRate: number;
  readonly minInfusionDuration: number;
  readonly durationStep: number;
  /** Peak evaluated this many h after the end of the infusion (0 = end of infusion). */
  readonly peakDelay: number;
  readonly loadingDose: { readonly enabled: boolean; readonly cap: number };
  /** Time (h) the first (loading or maintenance) dose starts. */
  readonly startTime: number;
  /** Distance bin for ranking ties (see module doc). */
  readonly closenessResolution: number;
  /** How many ranked candidates to return. */
  readonly maxCandidates: number;
}

/** Generic defaults (vancomycin-like; common practice). Use `regimenPresets` per drug. */
export const regimenSearchDefaultOptions: Readonly<RegimenSearchOptions> = Object.freeze({
  amountStep: 250,
  minAmount: 250,
  maxSingleDose: 3000,
  maxDailyDose: 4500,
  intervals: Object.freeze([6, 8, 12, 24, 36, 48]),
  maxInfusionRate: 1000,
  minInfusionDuration: 1,
  durationStep: 0.5,
  peakDelay: 0,
  loadingDose: Object.freeze({ enabled: false, cap: 3000 }),
  startTime: 0,
  closenessResolution: 0.1,
  maxCandidates: 10,
});

/**
 * Per-drug presets (site-configurable).
 * vancomycin: 250 mg steps and loading cap 3000 mg (common practice; 3000 mg cap in the Kidney360 summary of the
 * 2020 consensus), max daily 4500 mg (from memory: 2020 guideline, obese patients), ≤ 1000 mg/h (consensus summary).
 * aminoglycosides: 10 mg steps, 0.5 h infusions, extended intervals (common practice).
 */
export const regimenPresets: Readonly<Record<string, Readonly<Partial<RegimenSearchOptions>>>> =
  Object.freeze({
    vancomycin: Object.freeze({
      amountStep: 250,
      minAmount: 500,
      maxSingleDose: 3000,
      maxDailyDose: 4500,
      maxInfusionRate: 1000,
      minInfusionDuration: 1,
      peakDelay: 1,
    }),
    gentamicin: Object.freeze({
      amountStep: 10,
      minAmount: 40,
      maxSingleDose: 800,
      maxDailyDose: 800,
      maxInfusionRate: 2000,
      minInfusionDuration: 0.5,
      intervals: Object.freeze([8, 12, 24, 36, 48]),
      peakDelay: 0.5,
    }),
  });

export interface RegimenCandidate {
  readonly amount: number;
  readonly interval: number;
  readonly infusionDuration: number;
  readonly dosesPerDay: number;
  readonly dailyDose: number;
  readonly loadingDose: { readonly amount: number; readonly infusionDuration: number } | undefined;
  /** h, when the first maintenance dose starts. */
  readonly firstMaintenanceTime: number;
  readonly steadyState: Exposure;
  /** AUC over the first 24 h from the first dose (with the loading dose, if any), mg·h/L. */
  readonly auc24FirstDay: number;
  readonly met: Record<string, boolean>;
  readonly allTargetsMet: boolean;
  readonly distance: number;
  /** The dose list of the first 48 h, for plotting or re-simulation. */
  readonly schedule: Dose[];
}

export interface RegimenSearchResult {
  readonly outcome: 'targets-met' | 'no-regimen-meets-targets';
  readonly candidates: RegimenCandidate[];
  readonly counters: { readonly regimensEvaluated: number; readonly modelEvaluations: number };
  readonly warnings: EngineWarning[];
}

function infusionTime(amount: number, o: RegimenSearchOptions): number {
  const byRate = amount / o.maxInfusionRate;
  return Math.max(
    o.minInfusionDuration,
    Math.ceil(byRate / o.durationStep - 1e-9) * o.durationStep,
  );
}

/**
 * Find and rank practical regimens for a target.
 * @throws EngineError `invalid-input` (target, options), `not-linear` (Michaelis-Menten models).
 * @example findRegimens({ model: { compartments: 1, elimination: 'linear' }, parameters: { CL: 4, V1: 50 },
 *   target: { auc24: { min: 400, max: 600 } } }).candidates[0] // => { amount: 1000, interval: 12, … }
 */
export function findRegimens(input: {
  readonly model: ModelStructure;
  readonly parameters: PkParameters;
  readonly target: ExposureTarget;
  readonly options?: Partial<RegimenSearchOptions>;
}): RegimenSearchResult {
  const fn = 'findRegimens';
  const o: RegimenSearchOptions = { ...regimenSearchDefaultOptions, ...(input.options ?? {}) };
  validateTarget(fn, input.target);
  for (const f of [
    'amountStep',
    'minAmount',
    'maxSingleDose',
    'maxDailyDose',
    'maxInfusionRate',
    'minInfusionDuration',
    'durationStep',
  ] as const) {
    if (!(Number.isFinite(o[f]) && o[f] > 0))
      throw new EngineError(
        'invalid-input',
        `${fn}: options.${f} must be positive`,
        `options.${f}`,
      );
  }
  if (
    !Array.isArray(o.intervals) ||
    o.intervals.length === 0 ||
    o.intervals.some((t) => !(t > 0))
  ) {
    throw new EngineError(
      'invalid-input',
      `${fn}: options.intervals must be positive hours`,
      'options.intervals',
    );
  }
  const m = exponentialModel(input.model, input.parameters);
  const warnings: EngineWarning[] = [];
  let modelEvaluations = 0;
  const all: RegimenCandidate[] = [];
  for (const tau of o.intervals) {
    const maxAmount = Math.min(o.maxSingleDose, (o.maxDailyDose * tau) / 24);
    for (
      let amount = Math.ceil(o.minAmount / o.amountStep) * o.amountStep;
      amount <= maxAmount + 1e-9;
      amount += o.amountStep
    ) {
      const T = infusionTime(amount, o);
      if (T >= tau) continue;
      const dose: Dose = { time: 0, amount, route: 'infusion', duration: T };
      const peakAt = Math.min(T + o.peakDelay, tau);
      const peak = steadyStateConcentration(m, dose, tau, peakAt);
      const trough = steadyStateConcentration(m, dose, tau, tau);
      modelEvaluations += 2;
      const auc24 = (m.F * amount * (24 / tau)) / m.CL;
      let loading: RegimenCandidate['loadingDose'];
      if (o.loadingDose.enabled) {
        const ratio = peak / singleDoseConcentration(m, dose, peakAt);
        modelEvaluations++;
        const cap = Math.min(o.loadingDose.cap, o.maxSingleDose);
        const la = Math.min(
          Math.floor(cap / o.amountStep) * o.amountStep,
          Math.round((amount * ratio) / o.amountStep) * o.amountStep,
        );
        if (la > amount) loading = { amount: la, infusionDuration: infusionTime(la, o) };
      }
      const start = o.startTime;
      const schedule: Dose[] = [];
      if (loading)
        schedule.push({
          time: start,
          amount: loading.amount,
          route: 'infusion',
          duration: loading.infusionDuration,
        });
      for (let t = loading ? start + tau : start; t < start + 48 - 1e-9; t += tau)
        schedule.push({ time: t, amount, route: 'infusion', duration: T });
      const auc24FirstDay = superposedAuc(m, schedule, start, start + 24);
      modelEvaluations++;
      const exposure = { auc24, peak, trough };
      const met = targetsMet(exposure, input.target);
      all.push({
        amount,
        interval: tau,
        infusionDuration: T,
        dosesPerDay: 24 / tau,
        dailyDose: (amount * 24) / tau,
        loadingDose: loading,
        firstMaintenanceTime: loading ? start + tau : start,
        steadyState: exposure,
        auc24FirstDay,
        met: met.each,
        allTargetsMet: met.all,
        distance: targetDistance(exposure, input.target),
        schedule,
      });
    }
  }
  const bin = (d: number): number => Math.floor(d / o.closenessResolution);
  all.sort(
    (a, b) =>
      Number(b.allTargetsMet) - Number(a.allTargetsMet) ||
      bin(a.distance) - bin(b.distance) ||
      a.dosesPerDay - b.dosesPerDay ||
      a.dailyDose - b.dailyDose ||
      a.distance - b.distance,
  );
  const anyMet = all.some((c) => c.allTargetsMet);
  if (!anyMet) {
    warnings.push({
      code: 'no-regimen-meets-targets',
      message:
        'No regimen within the dose caps, intervals and infusion-rate limit meets every target; the closest are listed.',
    });
  }
  if (input.target.trough && !input.target.auc24) {
    warnings.push({
      code: 'trough-only-target',
      message:
        'A trough-only target; for vancomycin the 2020 consensus prefers AUC24-guided dosing.',
    });
  }
  return {
    outcome: anyMet ? 'targets-met' : 'no-regimen-meets-targets',
    candidates: all.slice(0, o.maxCandidates),
    counters: { regimensEvaluated: all.length, modelEvaluations },
    warnings,
  };
}
