import { buildEvents, TIME_SNAP } from '../dosing/events';
import { validateDoses } from '../dosing/validate-doses';
import { EngineError } from '../errors';
import { macroRateConstants, resolveModel } from '../models/parameters';
import { requireFinite, requirePositive } from '../models/validate';
import { simulate, type SimulateOptions } from '../simulate';
import type { Dose, ModelStructure, PkParameters } from '../types';
import type { RepeatedDose } from '../closed-form/linear';
import { michaelisMentenSteadyState } from '../closed-form/michaelis-menten';

/** Common input of the profile metrics. */
export interface ProfileInput {
  readonly model: ModelStructure;
  readonly parameters: PkParameters;
  readonly doses: readonly Dose[];
  readonly options?: Partial<SimulateOptions>;
}

/** Default sampling resolution (h) for peaks and threshold crossings found on a grid. */
export const METRICS_RESOLUTION = 0.02;
/**
 * Trough is read this long before the next dose, relative to max(1, |t|) h — 100× the event snapping
 * tolerance `TIME_SNAP`, so it is the left limit (before a bolus at that instant) to ~1e-9 relative.
 */
const BEFORE = 100 * TIME_SNAP;

/** Elimination half-lives (h) of a linear model: t½ = ln2/λ (Gibaldi M, Perrier D. Pharmacokinetics, 2nd ed., 1982, ch. 1–2). */
export interface HalfLives {
  /** Distribution half-life ln2/α (two compartments only). */
  readonly distribution: number | null;
  /** Terminal half-life ln2/β (ln2/k for one compartment). */
  readonly terminal: number;
}

/**
 * Half-lives of a linear model: one compartment ln2/k with k = CL/V; two compartments ln2/α and ln2/β.
 * Source: Gibaldi M, Perrier D. Pharmacokinetics, 2nd ed., 1982, ch. 1–2 (from memory).
 * @throws {EngineError} `unsupported` for Michaelis-Menten (no constant half-life: it depends on the level).
 * @example halfLives({ compartments: 1, elimination: 'linear' }, { CL: 5, V1: 50 }) // => { distribution: null, terminal: 6.93 }
 */
export function halfLives(model: ModelStructure, parameters: PkParameters): HalfLives {
  const fn = 'halfLives';
  const m = resolveModel(model, parameters, false, fn);
  if (m.michaelisMenten) {
    throw new EngineError(
      'unsupported',
      `${fn}: Michaelis-Menten elimination has no constant half-life (it lengthens as the level rises); use michaelisMentenTime90`,
      'model.elimination',
    );
  }
  if (m.compartments === 1) return { distribution: null, terminal: Math.LN2 / m.k10 };
  const [a, b] = macroRateConstants(m.k10, m.k12, m.k21);
  return { distribution: Math.LN2 / a, terminal: Math.LN2 / b };
}

/**
 * Accumulation factor of regular dosing every τ: R = 1/(1 − e^(−λz·τ)), λz the terminal rate constant.
 * Source: Gibaldi & Perrier 1982, ch. 3 (from memory).
 * @example accumulationFactor({ compartments: 1, elimination: 'linear' }, { CL: 5, V1: 50 }, 12) // => 1.4319
 */
export function accumulationFactor(
  model: ModelStructure,
  parameters: PkParameters,
  tau: number,
): number {
  requirePositive('accumulationFactor', 'tau', tau);
  const lz = Math.LN2 / halfLives(model, parameters).terminal;
  return 1 / -Math.expm1(-lz * tau);
}

/** Progress towards steady state after regular dosing for `elapsed` hours. */
export interface SteadyStateProgress {
  readonly halfLivesElapsed: number;
  /** 1 − 2^(−n): fraction of steady state reached (linear models). */
  readonly fractionOfSteadyState: number;
  readonly reached: boolean;
}

/**
 * Whether steady state has been reached after `elapsed` hours of regular dosing: n = elapsed/t½ terminal
 * half-lives, fraction 1 − 2^(−n) (Gibaldi & Perrier 1982, ch. 3); reached when n ≥ `halfLivesRequired`
 * (default 5 ≈ 96.9 %, common practice).
 * @throws {EngineError} `unsupported` for Michaelis-Menten (the half-life rule does not hold; use michaelisMentenTime90).
 */
export function steadyStateProgress(
  model: ModelStructure,
  parameters: PkParameters,
  elapsed: number,
  halfLivesRequired = 5,
): SteadyStateProgress {
  const fn = 'steadyStateProgress';
  requireFinite(fn, 'elapsed', elapsed);
  requirePositive(fn, 'halfLivesRequired', halfLivesRequired);
  const n = Math.max(0, elapsed) / halfLives(model, parameters).terminal;
  return {
    halfLivesElapsed: n,
    fractionOfSteadyState: 1 - 2 ** -n,
    reached: n >= halfLivesRequired,
  };
}

/** Peak, trough and AUC of one dosing interval [start, end). */
export interface IntervalMetrics {
  readonly start: number;
  readonly end: number;
  /** Highest concentration in the interval (mg/L) and its time (h), found on the event + `resolution` grid. */
  readonly peak: number;
  readonly peakTime: number;
  /** Concentration just before the next dose (left limit at `end`), mg/L. */
  readonly trough: number;
  /** AUC over the interval, mg·h/L (AUC state, exact to RK4 accuracy). */
  readonly auc: number;
}

function sortedDoseTimes(doses: readonly Dose[]): number[] {
  return [...new Set(doses.map((d) => d.time))].sort((a, b) => a - b);
}

/**
 * Peak, trough and AUC for every dosing interval (between consecutive distinct dose times; the last
 * interval lasts as long as the one before it, or `lastIntervalEnd` if given).
 * The peak is the maximum over the event times (infusion ends, absorption starts) and a grid of `resolution` h.
 * @throws {EngineError} as `simulate`; `invalid-input` when there are no doses.
 */
export function dosingIntervalMetrics(
  input: ProfileInput,
  resolution = METRICS_RESOLUTION,
  lastIntervalEnd?: number,
): IntervalMetrics[] {
  const fn = 'dosingIntervalMetrics';
  validateDoses(input.doses, fn);
  requirePositive(fn, 'resolution', resolution);
  const times = sortedDoseTimes(input.doses);
  if (times.length === 0)
    throw new EngineError('invalid-input', `${fn}: doses must not be empty`, 'doses');
  const lastStart = times[times.length - 1] as number;
  const prev = times.length > 1 ? lastStart - (times[times.length - 2] as number) : 24;
  const ends = [...times.slice(1), lastIntervalEnd ?? lastStart + prev];
  const m = resolveModel(
    input.model,
    input.parameters,
    input.doses.some((d) => d.route === 'oral'),
    fn,
  );
  const eventTimes = Array.from(buildEvents(input.doses, m).times);
  const out: number[] = [];
  const spans: { a: number; b: number; i0: number; i1: number; trough: number }[] = [];
  times.forEach((a, k) => {
    const b = ends[k] as number;
    const i0 = out.length;
    const n = Math.max(1, Math.ceil((b - a) / resolution));
    for (let i = 0; i < n; i++) out.push(a + ((b - a) * i) / n);
    for (const e of eventTimes) if (e > a && e < b) out.push(e);
    const i1 = out.length;
    out.push(b - BEFORE * Math.max(1, Math.abs(b)));
    spans.push({ a, b, i0, i1, trough: i1 });
  });
  const r = simulate({
    model: input.model,
    parameters: input.parameters,
    doses: input.doses,
    outputTimes: out,
    aucWindows: spans.map((s) => [s.a, s.b] as [number, number]),
    options: { ...input.options, estimateError: false },
  });
  return spans.map((s, k) => {
    let peak = -Infinity;
    let peakTime = s.a;
    for (let i = s.i0; i <= s.i1; i++) {
      const c = r.concentrations[i] as number;
      if (c > peak) {
        peak = c;
        peakTime = out[i] as number;
      }
    }
    return {
      start: s.a,
      end: s.b,
      peak,
      peakTime,
      trough: r.concentrations[s.trough] as number,
      auc: r.aucs[k] as number,
    };
  });
}

/** Time (h) above and below a threshold concentration in a window. */
export interface ThresholdTimes {
  readonly above: number;
  readonly below: number;
}

/**
 * Time above and below `threshold` (mg/L) within [from, to], from the RK4 profile sampled every
 * `resolution` h with linearly interpolated crossings (common practice, e.g. time above MIC).
 * @throws {EngineError} `invalid-input` (threshold < 0, to ≤ from) and as `simulate`.
 */
export function timeAboveThreshold(
  input: ProfileInput,
  threshold: number,
  from: number,
  to: number,
  resolution = METRICS_RESOLUTION,
): ThresholdTimes {
  const fn = 'timeAboveThreshold';
  requireFinite(fn, 'threshold', threshold);
  if (threshold < 0)
    throw new EngineError('invalid-input', `${fn}: threshold must be ≥ 0`, 'threshold');
  requireFinite(fn, 'from', from);
  requireFinite(fn, 'to', to);
  if (!(to > from)) throw new EngineError('invalid-input', `${fn}: to must be > from`, 'to');
  requirePositive(fn, 'resolution', resolution);
  const n = Math.max(1, Math.ceil((to - from) / resolution));
  const ts = Array.from({ length: n + 1 }, (_, i) => from + ((to - from) * i) / n);
  const c = simulate({
    ...input,
    outputTimes: ts,
    options: { ...input.options, estimateError: false },
  }).concentrations;
  let above = 0;
  for (let i = 0; i < n; i++) {
    const c0 = (c[i] as number) - threshold;
    const c1 = (c[i + 1] as number) - threshold;
    const dt = (ts[i + 1] as number) - (ts[i] as number);
    if (c0 >= 0 && c1 >= 0) above += dt;
    else if (c0 > 0 || c1 > 0) above += (dt * Math.max(c0, c1)) / Math.abs(c1 - c0);
  }
  return { above, below: to - from - above };
}

/** Steady-state exposure of a regular regimen, found by simulating until successive intervals agree. */
export interface SteadyStateMetrics {
  readonly peak: number;
  readonly trough: number;
  /** AUC over one interval at steady state, mg·h/L. */
  readonly aucTau: number;
  /** AUCτ·24/τ, mg·h/L. */
  readonly auc24: number;
  /** Doses simulated to reach it. */
  readonly dosesSimulated: number;
  /** Relative change in AUCτ between the last two intervals. */
  readonly lastChange: number;
  readonly converged: boolean;
}

/**
 * Peak, trough, AUCτ and AUC24 at steady state of `dose` every `tau` hours, for any model (linear or
 * Michaelis-Menten), by RK4 over enough doses that the last two intervals agree (relative change of AUCτ
 * < 1e-6). For linear models AUCτ,ss = F·D/CL (Gibaldi & Perrier 1982, ch. 3) — used in the tests as a check.
 * @throws {EngineError} `no-steady-state` for Michaelis-Menten with F·D/τ ≥ Vmax.
 */
export function steadyStateMetrics(
  model: ModelStructure,
  parameters: PkParameters,
  dose: RepeatedDose,
  tau: number,
  options?: Partial<SimulateOptions> & { maxDoses?: number },
): SteadyStateMetrics {
  const fn = 'steadyStateMetrics';
  requirePositive(fn, 'tau', tau);
  const single: Dose = { ...dose, time: 0 };
  validateDoses([single], fn);
  const m = resolveModel(model, parameters, dose.route === 'oral', fn);
  const maxDoses = options?.maxDoses ?? 5000;
  let lambda: number;
  if (m.michaelisMenten) {
    const rate = ((dose.route === 'oral' ? m.F : 1) * dose.amount) / tau;
    const css = michaelisMentenSteadyState(m.vmax, m.km, rate);
    // Local elimination rate near Css: Vmax·Km/(V1(Km + Css)²).
    lambda = (m.vmax * m.km) / (m.V1 * (m.km + css) ** 2);
  } else {
    lambda = Math.LN2 / halfLives(model, parameters).terminal;
  }
  const n = Math.min(maxDoses, Math.max(3, Math.ceil(Math.log(1e9) / (lambda * tau)) + 2));
  const doses = Array.from({ length: n }, (_, i) => ({ ...dose, time: i * tau }));
  const iv = dosingIntervalMetrics(
    { model, parameters, doses, options },
    METRICS_RESOLUTION,
    n * tau,
  );
  const last = iv[iv.length - 1] as IntervalMetrics;
  const before = iv[iv.length - 2] as IntervalMetrics;
  const change = Math.abs(last.auc - before.auc) / Math.max(last.auc, Number.MIN_VALUE);
  return {
    peak: last.peak,
    trough: last.trough,
    aucTau: last.auc,
    auc24: (last.auc * 24) / tau,
    dosesSimulated: n,
    lastChange: change,
    converged: change < 1e-6,
  };
}

/**
 * AUC over [start, start + 24 h] (mg·h/L) from the AUC state.
 * @throws {EngineError} as `simulate`.
 */
export function auc24(input: ProfileInput, start: number): number {
  requireFinite('auc24', 'start', start);
  return simulate({ ...input, outputTimes: [], aucWindows: [[start, start + 24]] })
    .aucs[0] as number;
}
