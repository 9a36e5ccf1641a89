/**
 * Regimen finder: enumerate practical regimens, predict their steady-state exposure from a patient's
 * (estimated or population) parameters, and rank them against a target.
 *
 * Regimen kinds (`regimenKind`, default `intermittent-infusion`, the original behaviour):
 * - `intermittent-infusion`: as below.
 * - `oral` / `intramuscular` (first-order absorption with F, ka, tlag; both simulated as the engine's `oral`
 *   route, so pass the route's own F/ka/tlag): steady-state peak at tmax,ss and pre-dose trough by the A4
 *   closed forms (`steadyStateOralConcentration`, `oralSteadyStatePeak`); AUC24,ss = F·daily dose/CL (A7).
 * - `continuous-infusion`: the daily dose as a constant rate R0 = daily dose/24 h; Css = R0/CL (Gibaldi &
 *   Perrier ch. 1; pk-reference A2) and AUC24 = Css·24; optional loading dose V·Css (V = V1 + V2 = Vss for two
 *   compartments; Gibaldi M, Perrier D. Pharmacokinetics, 2nd ed., 1982, ch. 1–2 — from memory), infused before
 *   the continuous infusion starts.
 * - Michaelis-Menten models (phenytoin), route `oral`, `intermittent-infusion` or `continuous-infusion`:
 *   R = S·F·dose/τ of active drug (salt factor `saltFactor`, F only for oral), Css = Km·R/(Vmax − R) and t90
 *   (pk-reference A8), interval peak/trough from an RK4 run to steady state
 *   (`michaelisMentenRegimenSteadyState`). A candidate with R ≥ Vmax is never extrapolated: it is listed in
 *   `refused` with code `no-steady-state`.
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
 * Ranking: all targets met first; then regimens within usual practice (`preferredIntervals`,
 * `usualMaxSingleDose`: see `practicalityOf`) before the rest; then distance from the target centre
 * (`targetDistance`) in bins of `closenessResolution`; then fewer doses per day; then smaller daily dose.
 * A regimen outside usual practice is still listed, with the reason, so a long interval in poor renal
 * function is offered when nothing usual meets the target.
 */
import { EngineError } from '../errors';
import {
  ORAL_LOADING_PORTION_MG,
  ORAL_LOADING_SPACING_H,
  maintenanceAfterPortions,
  oralLoadingPortions,
} from '../dosing/oral-loading';
import type { Dose, ModelStructure, PkParameters, Route } from '../types';
import type { EngineWarning } from '../estimation/types';
import {
  exponentialModel,
  maximiseOnInterval,
  oralSteadyStatePeak,
  singleDoseConcentration,
  steadyStateConcentration,
  steadyStateOralConcentration,
  superposedAuc,
  type ExponentialModel,
} from './linear-response';
import { simulate } from '../simulate';
import {
  michaelisMentenRegimenSteadyState,
  type MichaelisMentenSteadyStateOptions,
} from './michaelis-menten-steady-state';
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
  /**
   * Salt factor S, the fraction of the dosed salt that is active drug (phenytoin sodium 0.92: pk-reference A8).
   * Doses are enumerated and reported as given (salt form); predictions use S·dose. Default 1.
   */
  readonly saltFactor: number;
  /** Michaelis-Menten steady-state simulation settings (`michaelisMentenRegimenSteadyState`). */
  readonly steadyStateSimulation: Partial<MichaelisMentenSteadyStateOptions>;
  /**
   * Intervals (h) a ward gives as a matter of course; the other `intervals` are still searched but ranked
   * after these. Empty = no preference (every interval is usual).
   */
  readonly preferredIntervals: readonly number[];
  /** Largest single maintenance dose given as a matter of course, mg; larger ones rank after. 0 = no limit. */
  readonly usualMaxSingleDose: number;
  /**
   * Concentration already present when the regimen starts, mg/L (predicted from the doses given). A
   * Michaelis-Menten loading dose subtracts it; a linear one does not, and the result warns instead.
   */
  readonly currentConcentration: number;
  /**
   * Oral Michaelis-Menten loading doses are split into portions of at most this, mg, `oralLoadingSpacing` h
   * apart (phenytoin preset 400); 0 = one dose.
   */
  readonly oralLoadingPortion: number;
  readonly oralLoadingSpacing: number;
}

/**
 * How the regimen is given. `intermittent-infusion` is the default (the finder's original behaviour);
 * `oral` and `intramuscular` are first-order absorption; `continuous-infusion` is a constant rate.
 */
export type RegimenKind =
  'intermittent-infusion' | 'oral' | 'intramuscular' | 'continuous-infusion';

/** A candidate the finder would not predict, with the reason (e.g. `no-steady-state` when R ≥ Vmax). */
export interface RefusedRegimen {
  readonly amount: number;
  readonly interval: number;
  readonly dailyDose: number;
  readonly code: string;
  readonly message: string;
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
  saltFactor: 1,
  steadyStateSimulation: Object.freeze({}),
  preferredIntervals: Object.freeze([]),
  usualMaxSingleDose: 0,
  currentConcentration: 0,
  oralLoadingPortion: 0,
  oralLoadingSpacing: ORAL_LOADING_SPACING_H,
});

/**
 * Per-drug presets (site-configurable).
 * vancomycin: 250 mg steps and loading cap 3000 mg (common practice; 3000 mg cap in the Kidney360 summary of the
 * 2020 consensus), max daily 4500 mg (from memory: 2020 guideline, obese patients), ≤ 1000 mg/h (consensus summary).
 * Usual practice: adult maintenance every 12 or 24 h, single maintenance doses up to 2000 mg (common practice;
 * q8h for augmented clearance and q36–48h for poor renal function are kept for when nothing usual meets the
 * target — the minimum dose makes that happen by itself as clearance falls).
 * aminoglycosides: 10 mg steps, 0.5 h infusions, extended intervals (common practice); no interval preference,
 * because the trough target itself chooses the interval.
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
      preferredIntervals: Object.freeze([12, 24]),
      usualMaxSingleDose: 2000,
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
    /**
     * phenytoin: 25 mg steps (common practice: small steps because the kinetics are nonlinear; 25 mg is a
     * site choice here — the library's `doseRoundingMg` is 50), intervals 24/12/8 h and IV ≤ 50 mg/min
     * = 3000 mg/h (library practical settings; product label, from memory), salt factor 0.92 (pk-reference A8).
     * Daily cap 1000 mg is a generous guard (common practice), not a clinical maximum. Loading doses, when
     * asked for, are capped at 2000 mg (common practice; site-configurable) and given orally in portions of
     * ≤ 400 mg every 2 h (common practice: large single oral doses are absorbed slowly).
     */
    phenytoin: Object.freeze({
      amountStep: 25,
      minAmount: 25,
      maxSingleDose: 600,
      maxDailyDose: 1000,
      intervals: Object.freeze([24, 12, 8]),
      maxInfusionRate: 3000,
      minInfusionDuration: 0.5,
      durationStep: 0.25,
      peakDelay: 0,
      saltFactor: 0.92,
      loadingDose: Object.freeze({ enabled: false, cap: 2000 }),
      oralLoadingPortion: ORAL_LOADING_PORTION_MG,
    }),
    /**
     * vancomycin by continuous infusion: 250 mg daily-dose steps, up to 4500 mg/day (as the intermittent
     * preset), loading dose capped at 3000 mg (Kidney360 summary of the 2020 consensus).
     */
    vancomycinContinuous: Object.freeze({
      amountStep: 250,
      minAmount: 500,
      maxSingleDose: 4500,
      maxDailyDose: 4500,
      maxInfusionRate: 1000,
      minInfusionDuration: 1,
      loadingDose: Object.freeze({ enabled: true, cap: 3000 }),
    }),
  });

export interface RegimenCandidate {
  readonly amount: number;
  readonly interval: number;
  readonly infusionDuration: number;
  readonly dosesPerDay: number;
  readonly dailyDose: number;
  readonly loadingDose:
    | {
        readonly amount: number;
        readonly infusionDuration: number;
        /** Oral loading given in this many portions (`oralLoadingPortion`, `oralLoadingSpacing`). */
        readonly portions?: number;
      }
    | undefined;
  /** h, when the first maintenance dose starts. */
  readonly firstMaintenanceTime: number;
  readonly steadyState: Exposure;
  /** AUC over the first 24 h from the first dose (with the loading dose, if any), mg·h/L. */
  readonly auc24FirstDay: number;
  readonly met: Record<string, boolean>;
  readonly allTargetsMet: boolean;
  readonly distance: number;
  /** Within usual practice (preferred interval, single dose within the usual maximum)? */
  readonly usualPractice: boolean;
  /** Why not, in words a pharmacist reads (empty when usual). */
  readonly practicalityNotes: string[];
  /** The dose list of the first 48 h as given (salt form), for display. */
  readonly schedule: Dose[];
  readonly regimenKind: RegimenKind;
  /** Engine route of the maintenance doses (`infusion` for continuous infusion: back-to-back 24 h infusions). */
  readonly route: Route;
  /** Salt factor applied to the doses in `activeSchedule`. */
  readonly saltFactor: number;
  /** `schedule` with amounts × salt factor: what `simulate` needs. Equal to `schedule` when S = 1. */
  readonly activeSchedule: Dose[];
  /** Time of the steady-state peak after the dose start, h (the `peakDelay` point for intermittent infusion). */
  readonly peakTime: number;
  /** Continuous infusion rate, mg/h (continuous infusion only). */
  readonly infusionRate?: number;
  /** Michaelis-Menten details (phenytoin). */
  readonly michaelisMenten?: {
    /** Active input rate R = S·F·dose/τ, mg/h, and per day. */
    readonly inputRate: number;
    readonly inputPerDay: number;
    /** Closed-form Css = Km·R/(Vmax − R), mg/L. */
    readonly css: number;
    /** Time to 90 % of Css from no drug (A8), h and days: a level before this is not yet at steady state. */
    readonly time90Hours: number;
    readonly time90Days: number;
    /** Interval average of the RK4 steady state, mg/L, and its relative difference from `css`. */
    readonly simulatedAverage: number;
    readonly averageVsCss: number;
    /** Hours simulated to reach the steady state; whether it converged. */
    readonly simulatedHours: number;
    readonly converged: boolean;
  };
  /** Cautions about this candidate only. */
  readonly warnings: EngineWarning[];
}

export interface RegimenSearchResult {
  readonly outcome: 'targets-met' | 'no-regimen-meets-targets';
  readonly candidates: RegimenCandidate[];
  readonly regimenKind: RegimenKind;
  /** Candidates not predicted, with the reason (Michaelis-Menten R ≥ Vmax: `no-steady-state`). */
  readonly refused: RefusedRegimen[];
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

/** The input of `findRegimens`. */
export interface RegimenSearchInput {
  readonly model: ModelStructure;
  readonly parameters: PkParameters;
  readonly target: ExposureTarget;
  readonly options?: Partial<RegimenSearchOptions>;
  /**
   * How the regimen is given; default `intermittent-infusion`. Michaelis-Menten models must name it (oral vs
   * IV changes R through F), otherwise the finder refuses them as it always has.
   */
  readonly regimenKind?: RegimenKind;
}

const KINDS: readonly RegimenKind[] = [
  'intermittent-infusion',
  'oral',
  'intramuscular',
  'continuous-infusion',
];

/** Shared state of one search. */
interface Search {
  readonly fn: string;
  readonly input: RegimenSearchInput;
  readonly o: RegimenSearchOptions;
  readonly kind: RegimenKind;
  readonly S: number;
  readonly all: RegimenCandidate[];
  readonly refused: RefusedRegimen[];
  readonly warnings: EngineWarning[];
  evaluations: number;
}

/** Single-dose amounts for interval τ: multiples of `amountStep` from `minAmount` up to the caps. */
function amountsFor(o: RegimenSearchOptions, tau: number, dailyCapOnly = false): number[] {
  const maxAmount = dailyCapOnly
    ? o.maxDailyDose
    : Math.min(o.maxSingleDose, (o.maxDailyDose * tau) / 24);
  const out: number[] = [];
  const first = Math.ceil(o.minAmount / o.amountStep - 1e-9);
  for (let i = first; i * o.amountStep <= maxAmount + 1e-9; i++) out.push(i * o.amountStep);
  return out;
}

const scaled = (doses: readonly Dose[], S: number): Dose[] =>
  doses.map((d) => (S === 1 ? { ...d } : { ...d, amount: d.amount * S }));

/** Maintenance doses every τ from `first` up to start + 48 h (exclusive), after an optional loading dose. */
function schedule48(
  start: number,
  loading: Dose | undefined,
  first: number,
  tau: number,
  make: (t: number) => Dose,
): Dose[] {
  const out: Dose[] = loading ? [loading] : [];
  for (let i = 0; first + i * tau < start + 48 - 1e-9; i++) out.push(make(first + i * tau));
  return out;
}

/**
 * Whether a regimen is what a ward gives as a matter of course (options `preferredIntervals`,
 * `usualMaxSingleDose`), with the reasons when not. Continuous infusions have no interval to judge.
 */
export function practicalityOf(
  c: Pick<RegimenCandidate, 'amount' | 'interval' | 'regimenKind'>,
  o: Pick<RegimenSearchOptions, 'preferredIntervals' | 'usualMaxSingleDose'>,
): { usualPractice: boolean; practicalityNotes: string[] } {
  const notes: string[] = [];
  if (c.regimenKind !== 'continuous-infusion') {
    if (o.preferredIntervals.length > 0 && !o.preferredIntervals.includes(c.interval)) {
      notes.push(
        `Every ${c.interval} h is outside the usual intervals (${o.preferredIntervals.map((t) => `${t} h`).join(', ')}).`,
      );
    }
    if (o.usualMaxSingleDose > 0 && c.amount > o.usualMaxSingleDose) {
      notes.push(
        `A single dose of ${c.amount} mg is above the usual maintenance maximum of ${o.usualMaxSingleDose} mg.`,
      );
    }
  }
  return { usualPractice: notes.length === 0, practicalityNotes: notes };
}

function pushCandidate(
  s: Search,
  c: Omit<
    RegimenCandidate,
    'met' | 'allTargetsMet' | 'distance' | 'usualPractice' | 'practicalityNotes'
  >,
): void {
  const met = targetsMet(c.steadyState, s.input.target);
  s.all.push({
    ...c,
    met: met.each,
    allTargetsMet: met.all,
    distance: targetDistance(c.steadyState, s.input.target),
    ...practicalityOf(c, s.o),
  });
}

/** The original intermittent-infusion search (linear models), with the salt factor applied to predictions. */
function searchIntermittent(s: Search, m: ExponentialModel): void {
  const { o, S } = s;
  for (const tau of o.intervals) {
    for (const amount of amountsFor(o, tau)) {
      const T = infusionTime(amount, o);
      if (T >= tau) continue;
      const dose: Dose = { time: 0, amount: S * amount, route: 'infusion', duration: T };
      const peakAt = Math.min(T + o.peakDelay, tau);
      const peak = steadyStateConcentration(m, dose, tau, peakAt);
      const trough = steadyStateConcentration(m, dose, tau, tau);
      s.evaluations += 2;
      // AUC24,ss = F·daily dose/CL (pk-reference A7).
      const auc24 = (m.F * S * amount * (24 / tau)) / m.CL;
      let loading: RegimenCandidate['loadingDose'];
      if (o.loadingDose.enabled) {
        const ratio = peak / singleDoseConcentration(m, dose, peakAt);
        s.evaluations++;
        const cap = Math.min(o.loadingDose.cap, o.maxSingleDose);
        const la = Math.min(
          Math.floor(cap / o.amountStep) * o.amountStep,
          Math.round((amount * ratio) / o.amountStep) * o.amountStep,
        );
        if (la > amount) loading = { amount: la, infusionDuration: infusionTime(la, o) };
      }
      const start = o.startTime;
      const schedule = schedule48(
        start,
        loading && {
          time: start,
          amount: loading.amount,
          route: 'infusion',
          duration: loading.infusionDuration,
        },
        loading ? start + tau : start,
        tau,
        (t) => ({ time: t, amount, route: 'infusion', duration: T }),
      );
      const activeSchedule = scaled(schedule, S);
      const auc24FirstDay = superposedAuc(m, activeSchedule, start, start + 24);
      s.evaluations++;
      pushCandidate(s, {
        amount,
        interval: tau,
        infusionDuration: T,
        dosesPerDay: 24 / tau,
        dailyDose: (amount * 24) / tau,
        loadingDose: loading,
        firstMaintenanceTime: loading ? start + tau : start,
        steadyState: { auc24, peak, trough },
        auc24FirstDay,
        schedule,
        regimenKind: s.kind,
        route: 'infusion',
        saltFactor: S,
        activeSchedule,
        peakTime: peakAt,
        warnings: [],
      });
    }
  }
}

/**
 * Oral / IM (first-order absorption), linear models: steady-state peak at tmax,ss and pre-dose trough by the
 * A4 closed forms, AUC24,ss = F·daily dose/CL (A7). Loading dose as for infusions: maintenance × (steady-state
 * peak / first-dose peak), so the first peak approximates the steady-state one.
 */
function searchOral(s: Search, m: ExponentialModel): void {
  const { o, S } = s;
  for (const tau of o.intervals) {
    for (const amount of amountsFor(o, tau)) {
      const active = S * amount;
      const pk = oralSteadyStatePeak(m, active, tau);
      const trough = steadyStateOralConcentration(m, active, tau, 0);
      s.evaluations += 2;
      const auc24 = (m.F * active * (24 / tau)) / m.CL;
      let loading: RegimenCandidate['loadingDose'];
      if (o.loadingDose.enabled) {
        const single: Dose = { time: 0, amount: active, route: 'oral' };
        const first = maximiseOnInterval((t) => singleDoseConcentration(m, single, t), 0, tau);
        s.evaluations++;
        const cap = Math.min(o.loadingDose.cap, o.maxSingleDose);
        const la = Math.min(
          Math.floor(cap / o.amountStep) * o.amountStep,
          Math.round((amount * (pk.concentration / first.value)) / o.amountStep) * o.amountStep,
        );
        if (la > amount) loading = { amount: la, infusionDuration: 0 };
      }
      const start = o.startTime;
      const schedule = schedule48(
        start,
        loading && { time: start, amount: loading.amount, route: 'oral' },
        loading ? start + tau : start,
        tau,
        (t) => ({ time: t, amount, route: 'oral' }),
      );
      const activeSchedule = scaled(schedule, S);
      const auc24FirstDay = superposedAuc(m, activeSchedule, start, start + 24);
      s.evaluations++;
      pushCandidate(s, {
        amount,
        interval: tau,
        infusionDuration: 0,
        dosesPerDay: 24 / tau,
        dailyDose: (amount * 24) / tau,
        loadingDose: loading,
        firstMaintenanceTime: loading ? start + tau : start,
        steadyState: { auc24, peak: pk.concentration, trough },
        auc24FirstDay,
        schedule,
        regimenKind: s.kind,
        route: 'oral',
        saltFactor: S,
        activeSchedule,
        peakTime: pk.time,
        warnings: [],
      });
    }
  }
}

/**
 * Continuous infusion, linear models: daily dose D as R0 = D/24 mg/h; Css = R0/CL (pk-reference A2),
 * AUC24 = Css·24. Loading dose (optional) = Css·V, V = V1 (one compartment) or V1 + V2 = Vss (two; A6),
 * rounded and capped, infused first; the continuous infusion starts when it ends.
 */
function searchContinuous(s: Search, m: ExponentialModel, parameters: PkParameters): void {
  const { o, S } = s;
  const vss = parameters.V1 + (m.a.length === 2 ? (parameters.V2 ?? 0) : 0);
  for (const daily of amountsFor(o, 24, true)) {
    const R0 = daily / 24;
    if (R0 > o.maxInfusionRate + 1e-9) continue;
    const css = (S * R0) / m.CL;
    s.evaluations++;
    let loading: RegimenCandidate['loadingDose'];
    if (o.loadingDose.enabled) {
      const cap = Math.min(o.loadingDose.cap, o.maxSingleDose);
      const la = Math.min(
        Math.floor(cap / o.amountStep) * o.amountStep,
        Math.round((css * vss) / S / o.amountStep) * o.amountStep,
      );
      if (la > 0) loading = { amount: la, infusionDuration: infusionTime(la, o) };
    }
    const start = o.startTime;
    const first = loading ? start + loading.infusionDuration : start;
    const schedule = schedule48(
      start,
      loading && {
        time: start,
        amount: loading.amount,
        route: 'infusion',
        duration: loading.infusionDuration,
      },
      first,
      24,
      (t) => ({ time: t, amount: daily, route: 'infusion', duration: 24 }),
    );
    const activeSchedule = scaled(schedule, S);
    const auc24FirstDay = superposedAuc(m, activeSchedule, start, start + 24);
    s.evaluations++;
    pushCandidate(s, {
      amount: daily,
      interval: 24,
      infusionDuration: 24,
      dosesPerDay: 1,
      dailyDose: daily,
      loadingDose: loading,
      firstMaintenanceTime: first,
      steadyState: { auc24: css * 24, peak: css, trough: css, css },
      auc24FirstDay,
      schedule,
      regimenKind: s.kind,
      route: 'infusion',
      saltFactor: S,
      activeSchedule,
      peakTime: 0,
      infusionRate: R0,
      warnings: [],
    });
  }
}

/**
 * Michaelis-Menten (phenytoin): candidates in `amountStep` steps per interval (continuous: daily doses),
 * R = S·F·dose/τ; R ≥ Vmax refused (`no-steady-state`); otherwise Css = Km·R/(Vmax − R), t90 (A8) and the
 * RK4 steady-state peak/trough/AUC24 (`michaelisMentenRegimenSteadyState`).
 */
/**
 * Michaelis-Menten (phenytoin) loading dose to the candidate's own steady-state peak:
 * LD = V·(Cdesired − C0)/(S·F) (Winter ME, Basic Clinical Pharmacokinetics, phenytoin chapter; Bauer LA, Applied
 * Clinical Pharmacokinetics, ch. 10 — from memory), with Cdesired = the steady-state peak and
 * C0 = `currentConcentration`. Aiming at the peak, as the linear loading dose does, puts the patient on the
 * steady-state cycle: the decline over the first interval follows the same elimination as at steady state, so
 * the first maintenance dose, one interval later, arrives near the steady-state trough. Rounded to
 * `amountStep`, capped at `loadingDose.cap`; IV over amount/`maxInfusionRate`; oral in portions of
 * ≤ `oralLoadingPortion`. None when it would not exceed one maintenance dose, or when C0 already reaches the
 * steady state.
 */
function michaelisMentenLoading(
  s: Search,
  aim: number,
  maintenance: number,
  route: 'oral' | 'infusion',
  start: number,
  warnings: EngineWarning[],
): { loading: NonNullable<RegimenCandidate['loadingDose']>; doses: Dose[] } | undefined {
  const { o, S, input } = s;
  const V = input.parameters.V1;
  const F = route === 'oral' ? (input.parameters.F ?? 1) : 1;
  const c0 = o.currentConcentration;
  if (c0 >= aim) {
    warnings.push({
      code: 'no-loading-dose-needed',
      message: `The concentration at the start (${c0.toFixed(1)} mg/L) already reaches this regimen's steady-state peak (${aim.toFixed(1)} mg/L): no loading dose.`,
    });
    return undefined;
  }
  const exact = (V * (aim - c0)) / (S * F);
  let amount = Math.round(exact / o.amountStep) * o.amountStep;
  if (amount > o.loadingDose.cap) {
    amount = Math.floor(o.loadingDose.cap / o.amountStep) * o.amountStep;
    warnings.push({
      code: 'loading-dose-capped',
      message: `The loading dose to reach ${aim.toFixed(1)} mg/L would be ${Math.round(exact)} mg; it is capped at ${o.loadingDose.cap} mg, so the first days run below the steady state.`,
    });
  }
  if (amount <= maintenance) return undefined;
  if (route === 'infusion') {
    const duration = infusionTime(amount, o);
    return {
      loading: { amount, infusionDuration: duration },
      doses: [{ time: start, amount, route: 'infusion', duration }],
    };
  }
  if (o.oralLoadingPortion === 0)
    return {
      loading: { amount, infusionDuration: 0 },
      doses: [{ time: start, amount, route: 'oral' }],
    };
  const doses: Dose[] = oralLoadingPortions(amount, o.oralLoadingPortion, o.oralLoadingSpacing).map(
    (p) => ({ time: start + p.offsetH, amount: p.amount, route: 'oral' }),
  );
  return { loading: { amount, infusionDuration: 0, portions: doses.length }, doses };
}

function searchMichaelisMenten(s: Search): void {
  const { o, S, input } = s;
  const continuous = s.kind === 'continuous-infusion';
  const route = s.kind === 'oral' || s.kind === 'intramuscular' ? 'oral' : 'infusion';
  const intervals = continuous ? [24] : o.intervals;
  for (const tau of intervals) {
    for (const amount of amountsFor(o, tau, continuous)) {
      if (continuous && amount / 24 > o.maxInfusionRate + 1e-9) continue;
      const T = continuous ? 24 : route === 'infusion' ? infusionTime(amount, o) : 0;
      if (!continuous && route === 'infusion' && T >= tau) continue;
      const r = michaelisMentenRegimenSteadyState(
        input.model,
        input.parameters,
        {
          amount,
          interval: tau,
          route: continuous ? 'continuous' : route,
          infusionDuration: T,
          saltFactor: S,
        },
        o.steadyStateSimulation,
      );
      s.evaluations++;
      const dailyDose = (amount * 24) / tau;
      if (r.outcome === 'no-steady-state') {
        s.refused.push({
          amount,
          interval: tau,
          dailyDose,
          code: 'no-steady-state',
          message: r.message,
        });
        continue;
      }
      const warnings: EngineWarning[] = [];
      const averageVsCss = r.average / r.css - 1;
      if (r.outcome === 'not-converged') {
        warnings.push({
          code: 'steady-state-not-simulated',
          message: `The simulation did not settle within ${Math.round(r.simulatedHours / 24)} days (t90 ${(r.time90 / 24).toFixed(1)} days); its peak and trough are approximate.`,
        });
      }
      if (Math.abs(averageVsCss) > 0.02) {
        warnings.push({
          code: 'interval-average-differs',
          message: `The simulated interval average (${r.average.toFixed(2)} mg/L) differs from the constant-input Css (${r.css.toFixed(2)} mg/L) by ${(averageVsCss * 100).toFixed(1)} %: the swing within the interval matters with nonlinear elimination.`,
        });
      }
      const start = o.startTime;
      const make = (t: number): Dose =>
        route === 'oral'
          ? { time: t, amount, route: 'oral' }
          : { time: t, amount, route: 'infusion', duration: T };
      const load = o.loadingDose.enabled
        ? michaelisMentenLoading(s, r.peak, amount, route, start, warnings)
        : undefined;
      const firstMaintenance = load
        ? start +
          maintenanceAfterPortions(
            load.doses.map((d) => ({ offsetH: d.time - start, amount: d.amount })),
            tau,
            o.oralLoadingSpacing,
          )
        : start;
      const schedule = [
        ...(load?.doses ?? []),
        ...schedule48(start, undefined, firstMaintenance, tau, make),
      ];
      const activeSchedule = scaled(schedule, S);
      // First-day AUC: no superposition for Michaelis-Menten, so an RK4 run over the first 24 h.
      const auc24FirstDay = simulate({
        model: input.model,
        parameters: input.parameters,
        doses: activeSchedule,
        outputTimes: [],
        aucWindows: [[start, start + 24]],
        options: { estimateError: false },
      }).aucs[0]!;
      s.evaluations++;
      pushCandidate(s, {
        amount,
        interval: tau,
        infusionDuration: T,
        dosesPerDay: 24 / tau,
        dailyDose,
        loadingDose: load?.loading,
        firstMaintenanceTime: firstMaintenance,
        steadyState: { auc24: r.auc24, peak: r.peak, trough: r.trough, css: r.css },
        auc24FirstDay,
        schedule,
        regimenKind: s.kind,
        route,
        saltFactor: S,
        activeSchedule,
        peakTime: r.peakTime,
        ...(continuous ? { infusionRate: amount / 24 } : {}),
        michaelisMenten: {
          inputRate: r.inputRate,
          inputPerDay: r.inputRate * 24,
          css: r.css,
          time90Hours: r.time90,
          time90Days: r.time90 / 24,
          simulatedAverage: r.average,
          averageVsCss,
          simulatedHours: r.simulatedHours,
          converged: r.outcome === 'steady-state',
        },
        warnings,
      });
    }
  }
  if (s.refused.length > 0) {
    s.warnings.push({
      code: 'no-steady-state',
      message: `${s.refused.length} candidate(s) at or above this patient's Vmax were left out: they have no steady state.`,
    });
  }
  s.warnings.push({
    code: 'michaelis-menten-time-to-steady-state',
    message:
      'Michaelis-Menten kinetics: the time to steady state grows with the dose (see each candidate’s t90); a level drawn earlier under-reads the steady state.',
  });
}

/**
 * Find and rank practical regimens for a target.
 * @throws EngineError `invalid-input` (target, options, regimenKind), `not-linear` (a Michaelis-Menten model
 *   without an explicit `regimenKind`).
 * @example findRegimens({ model: { compartments: 1, elimination: 'linear' }, parameters: { CL: 4, V1: 50 },
 *   target: { auc24: { min: 400, max: 600 } } }).candidates[0] // => { amount: 1000, interval: 12, … }
 * @example findRegimens({ model: { compartments: 1, elimination: 'michaelis-menten' },
 *   parameters: { V1: 49, Vmax: 415 / 24, Km: 5.7, ka: 0.3, F: 0.859 }, target: { css: { min: 10, max: 20 } },
 *   regimenKind: 'oral', options: { ...regimenPresets.phenytoin } }).candidates[0].michaelisMenten.time90Days
 * // => ≈ 12
 */
export function findRegimens(input: RegimenSearchInput): RegimenSearchResult {
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
  if (!(Number.isFinite(o.currentConcentration) && o.currentConcentration >= 0))
    throw new EngineError(
      'invalid-input',
      `${fn}: options.currentConcentration must be ≥ 0 mg/L`,
      'options.currentConcentration',
    );
  if (!(Number.isFinite(o.oralLoadingPortion) && o.oralLoadingPortion >= 0))
    throw new EngineError(
      'invalid-input',
      `${fn}: options.oralLoadingPortion must be ≥ 0 mg (0: one dose)`,
      'options.oralLoadingPortion',
    );
  if (!(Number.isFinite(o.oralLoadingSpacing) && o.oralLoadingSpacing > 0))
    throw new EngineError(
      'invalid-input',
      `${fn}: options.oralLoadingSpacing must be positive`,
      'options.oralLoadingSpacing',
    );
  if (!(o.saltFactor > 0 && o.saltFactor <= 1))
    throw new EngineError(
      'invalid-input',
      `${fn}: options.saltFactor must be in (0, 1]`,
      'options.saltFactor',
    );
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
  if (
    !Array.isArray(o.preferredIntervals) ||
    o.preferredIntervals.some((t) => !(Number.isFinite(t) && t > 0))
  ) {
    throw new EngineError(
      'invalid-input',
      `${fn}: options.preferredIntervals must be positive hours (empty for no preference)`,
      'options.preferredIntervals',
    );
  }
  if (!(Number.isFinite(o.usualMaxSingleDose) && o.usualMaxSingleDose >= 0))
    throw new EngineError(
      'invalid-input',
      `${fn}: options.usualMaxSingleDose must be ≥ 0 mg (0 for no limit)`,
      'options.usualMaxSingleDose',
    );
  const kind = input.regimenKind ?? 'intermittent-infusion';
  if (!KINDS.includes(kind))
    throw new EngineError(
      'invalid-input',
      `${fn}: regimenKind must be one of ${KINDS.join(', ')}`,
      'regimenKind',
    );
  const s: Search = {
    fn,
    input,
    o,
    kind,
    S: o.saltFactor,
    all: [],
    refused: [],
    warnings: [],
    evaluations: 0,
  };
  if (input.model?.elimination === 'michaelis-menten') {
    if (input.regimenKind === undefined) {
      throw new EngineError(
        'not-linear',
        `${fn}: a Michaelis-Menten model needs an explicit regimenKind ('oral', 'intermittent-infusion' or 'continuous-infusion'), because oral and IV doses give different input rates`,
        'regimenKind',
      );
    }
    searchMichaelisMenten(s);
  } else if (kind === 'oral' || kind === 'intramuscular') {
    searchOral(s, exponentialModel(input.model, input.parameters, true));
  } else if (kind === 'continuous-infusion') {
    searchContinuous(s, exponentialModel(input.model, input.parameters), input.parameters);
  } else {
    searchIntermittent(s, exponentialModel(input.model, input.parameters));
  }
  const { all, warnings } = s;
  const bin = (d: number): number => Math.floor(d / o.closenessResolution);
  all.sort(
    (a, b) =>
      Number(b.allTargetsMet) - Number(a.allTargetsMet) ||
      Number(b.usualPractice) - Number(a.usualPractice) ||
      bin(a.distance) - bin(b.distance) ||
      a.dosesPerDay - b.dosesPerDay ||
      a.dailyDose - b.dailyDose ||
      a.distance - b.distance,
  );
  if (
    o.loadingDose.enabled &&
    o.currentConcentration > 0 &&
    input.model?.elimination !== 'michaelis-menten'
  ) {
    warnings.push({
      code: 'loading-with-drug-on-board',
      message: `About ${o.currentConcentration.toFixed(1)} mg/L is predicted when the regimen starts: the loading doses listed assume none on board; consider a smaller one or none.`,
    });
  }
  const anyMet = all.some((c) => c.allTargetsMet);
  if (!anyMet) {
    warnings.push({
      code: 'no-regimen-meets-targets',
      message:
        'No regimen within the dose caps, intervals and infusion-rate limit meets every target; the closest are listed.',
    });
  }
  if (
    input.target.trough &&
    !input.target.auc24 &&
    input.model?.elimination !== 'michaelis-menten'
  ) {
    warnings.push({
      code: 'trough-only-target',
      message:
        'A trough-only target; for vancomycin the 2020 consensus prefers AUC24-guided dosing.',
    });
  }
  return {
    outcome: anyMet ? 'targets-met' : 'no-regimen-meets-targets',
    candidates: all.slice(0, o.maxCandidates),
    regimenKind: kind,
    refused: s.refused,
    counters: { regimensEvaluated: all.length, modelEvaluations: s.evaluations },
    warnings,
  };
}
