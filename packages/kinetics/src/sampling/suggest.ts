/**
 * Sampling-time suggestion: where to draw the next level(s) so that the predicted steady-state AUC24 is
 * known most precisely.
 *
 * Method (linearised Bayesian design; Fedorov VV. Theory of Optimal Experiments, 1972, and its Bayesian form
 * in Chaloner K, Verdinelli I. Stat Sci 1995;10:273–304 — from memory):
 *   current precision of η (log-parameters): P0 = Σ0⁻¹ — the Laplace posterior covariance of a fit, or the
 *   prior diag(ω²) before any level;
 *   a draw at time t adds the first-order Fisher information J(t)·J(t)ᵀ/σ²(t), J = ∂f(t)/∂η by central
 *   differences at the current estimate, σ² = add² + (prop·f)² (the variance's own dependence on η is ignored);
 *   predicted posterior variance of ln AUC24 after draws S: gᵀ(P0 + Σ_S J Jᵀ/σ²)⁻¹g, with g = ∂ ln AUC24,ss/∂η
 *   and AUC24,ss = F·daily dose/CL (pk-reference A7) — c-optimality for ln AUC24. The D-optimal criterion
 *   ln det(P) is reported beside it.
 * Candidate times lie on a grid from `distributionPhaseHours` after the end of the named dose's infusion to the
 * start of the next dose. The conventional pair (post-distribution peak + trough just before the next dose)
 * is always reported, with the best single time and the best pair from an exhaustive search.
 * Oral/IM doses (first-order absorption): the conventional pair is the steady-state peak at tmax,ss (A4 closed
 * form for one compartment, `oralSteadyStatePeak`; numerical maximum for two) and the pre-dose trough; the
 * grid starts one `gridStep` after the absorption lag.
 * Predictions use exact exponential sums; linear models only (Michaelis-Menten: `suggestSteadyStateTrough`).
 */
import { EngineError } from '../errors';
import { inverseSpd, quadraticForm } from '../estimation/linalg';
import type { EngineWarning, ResidualErrorModel } from '../estimation/types';
import {
  exponentialModel,
  oralSteadyStatePeak,
  superposedConcentrations,
} from '../regimen/linear-response';
import type { Dose, ModelStructure, PkParameters } from '../types';

export interface SamplingOptions {
  /** Grid step for candidate times, h. */
  readonly gridStep: number;
  /** Earliest draw after the end of the infusion, h (vancomycin 1 h: common practice). */
  readonly distributionPhaseHours: number;
  /** The conventional trough is drawn this many h before the next dose (common practice: within 0.5 h). */
  readonly troughBeforeNextDose: number;
  /** How many ranked single times to return. */
  readonly maxAlternatives: number;
}

export const samplingDefaultOptions: Readonly<SamplingOptions> = Object.freeze({
  gridStep: 0.25,
  distributionPhaseHours: 1,
  troughBeforeNextDose: 0.5,
  maxAlternatives: 8,
});

export interface DrawTime {
  /** Absolute time, h. */
  readonly time: number;
  /** The named dose (index in `doses`). */
  readonly doseIndex: number;
  readonly hoursAfterDoseStart: number;
  readonly hoursAfterInfusionEnd: number;
  /** Predicted concentration at the draw, mg/L. */
  readonly predicted: number;
}

export interface DesignValue {
  readonly draws: DrawTime[];
  /** Predicted SD of ln AUC24 after these draws (≈ CV of AUC24). */
  readonly sdLogAuc24: number;
  /** 1 − SD_after/SD_now. */
  readonly reduction: number;
  /** ln det of the η precision after these draws (D-optimal criterion; larger is better). */
  readonly logDetPrecision: number;
}

export interface SamplingSuggestion {
  /** SD of ln AUC24 before any new draw. */
  readonly currentSdLogAuc24: number;
  readonly conventional: DesignValue;
  readonly bestSingle: DesignValue;
  readonly bestPair: DesignValue;
  /** Single times ranked by how much they shrink the AUC24 uncertainty. */
  readonly alternatives: DesignValue[];
  /** How much the second draw adds to the best single one: 1 − SD_pair/SD_single. */
  readonly valueOfSecondLevel: number;
  readonly counters: { readonly candidateTimes: number; readonly modelEvaluations: number };
  readonly warnings: EngineWarning[];
}

function logDet(a: number[][]): number {
  // via Cholesky diagonal
  const n = a.length;
  const l: number[][] = a.map((r) => r.slice());
  let s = 0;
  for (let j = 0; j < n; j++) {
    let d = l[j]![j]!;
    for (let k = 0; k < j; k++) d -= l[j]![k]! ** 2;
    if (!(d > 0)) return Number.NEGATIVE_INFINITY;
    const ljj = Math.sqrt(d);
    l[j]![j] = ljj;
    s += 2 * Math.log(ljj);
    for (let i = j + 1; i < n; i++) {
      let v = l[i]![j]!;
      for (let k = 0; k < j; k++) v -= l[i]![k]! * l[j]![k]!;
      l[i]![j] = v / ljj;
    }
  }
  return s;
}

/**
 * Suggest draw times after dose `doseIndex` of `doses` and rank alternatives by the predicted AUC24 uncertainty.
 * @param input.parameters all parameters at the current estimate; `estimated` and `covarianceEta` from `fitMap`
 *   (or the prior: names with omega > 0 and diag(ω²)).
 * @throws EngineError `invalid-input` (dose index, covariance, regimen), `not-linear`.
 * @example suggestSamplingTimes({ model, parameters, estimated: ['CL', 'V1'], covarianceEta: [[0.09, 0], [0, 0.0625]],
 *   residualError: { additive: 1, proportional: 0.1 }, doses, doseIndex: 3 }).conventional.draws // => [{ hoursAfterInfusionEnd: 1, … }, …]
 */
export function suggestSamplingTimes(input: {
  readonly model: ModelStructure;
  readonly parameters: PkParameters;
  readonly estimated: readonly string[];
  readonly covarianceEta: readonly (readonly number[])[];
  readonly residualError: ResidualErrorModel;
  /** The planned dose list (e.g. a finder candidate's `schedule`, or history + plan). */
  readonly doses: readonly Dose[];
  /** Index in `doses` of the dose to sample after. */
  readonly doseIndex: number;
  readonly options?: Partial<SamplingOptions>;
}): SamplingSuggestion {
  const fn = 'suggestSamplingTimes';
  const o: SamplingOptions = { ...samplingDefaultOptions, ...(input.options ?? {}) };
  const { doses, doseIndex, estimated } = input;
  if (
    !Array.isArray(doses) ||
    !Number.isInteger(doseIndex) ||
    doseIndex < 0 ||
    doseIndex >= doses.length
  ) {
    throw new EngineError(
      'invalid-input',
      `${fn}: doseIndex must index a dose in doses`,
      'doseIndex',
    );
  }
  const n = estimated.length;
  if (n === 0)
    throw new EngineError(
      'invalid-input',
      `${fn}: estimated must name at least one parameter`,
      'estimated',
    );
  const sigma0 = input.covarianceEta;
  if (!Array.isArray(sigma0) || sigma0.length !== n || sigma0.some((r) => r.length !== n)) {
    throw new EngineError(
      'invalid-input',
      `${fn}: covarianceEta must be ${n}×${n}`,
      'covarianceEta',
    );
  }
  const p0 = inverseSpd(sigma0);
  if (!p0)
    throw new EngineError(
      'invalid-input',
      `${fn}: covarianceEta is not positive definite`,
      'covarianceEta',
    );
  const dose = doses[doseIndex]!;
  const T = dose.route === 'infusion' ? (dose.duration ?? 0) : 0;
  const later = doses.filter((d) => d.time > dose.time).map((d) => d.time);
  const nextStart = later.length > 0 ? Math.min(...later) : undefined;
  if (nextStart === undefined) {
    throw new EngineError(
      'invalid-input',
      `${fn}: the named dose must be followed by another dose (its interval needs an end)`,
      'doseIndex',
    );
  }
  const interval = nextStart - dose.time;
  const oralDose = dose.route === 'oral';
  const oral = doses.some((d) => d.route === 'oral');
  const first = oralDose
    ? dose.time + (input.parameters.tlag ?? 0) + o.gridStep
    : dose.time + T + o.distributionPhaseHours;
  if (first >= nextStart)
    throw new EngineError(
      'invalid-input',
      `${fn}: the interval is too short for a ${oralDose ? 'post-absorption' : 'post-distribution'} draw`,
      'doses',
    );
  const times: number[] = [];
  for (let t = first; t <= nextStart + 1e-9; t += o.gridStep) times.push(Math.min(t, nextStart));
  const trough = nextStart - o.troughBeforeNextDose;
  let peakTime = first;
  if (oralDose) {
    // Peak near tmax,ss (Gibaldi & Perrier ch. 3; pk-reference A4) at the current estimate.
    const tm = oralSteadyStatePeak(
      exponentialModel(input.model, input.parameters, true),
      dose.amount,
      interval,
    ).time;
    peakTime = Math.min(Math.max(dose.time + tm, first), trough);
  }
  const conventionalTimes = [peakTime, Math.max(peakTime, trough)];
  const allTimes = [...times, ...conventionalTimes];

  const base = input.parameters as unknown as Record<string, number>;
  let modelEvaluations = 0;
  const predictAt = (eta: readonly number[]): number[] => {
    const p: Record<string, number> = { ...base };
    estimated.forEach((k, j) => (p[k] = base[k]! * Math.exp(eta[j]!)));
    modelEvaluations++;
    return superposedConcentrations(
      exponentialModel(input.model, p as unknown as PkParameters, oral),
      doses,
      allTimes,
    );
  };
  const auc24At = (eta: readonly number[]): number => {
    const p: Record<string, number> = { ...base };
    estimated.forEach((k, j) => (p[k] = base[k]! * Math.exp(eta[j]!)));
    const m = exponentialModel(input.model, p as unknown as PkParameters, oral);
    return (m.F * dose.amount * 24) / interval / m.CL;
  };
  const h = 1e-4;
  const zero = new Array<number>(n).fill(0);
  const f0 = predictAt(zero);
  const jac: number[][] = allTimes.map(() => new Array<number>(n).fill(0));
  const g = new Array<number>(n).fill(0);
  for (let j = 0; j < n; j++) {
    const up = zero.slice();
    const dn = zero.slice();
    up[j] = h;
    dn[j] = -h;
    const fu = predictAt(up);
    const fd = predictAt(dn);
    for (let i = 0; i < allTimes.length; i++) jac[i]![j] = (fu[i]! - fd[i]!) / (2 * h);
    g[j] = (Math.log(auc24At(up)) - Math.log(auc24At(dn))) / (2 * h);
  }
  const { additive, proportional } = input.residualError;
  const info = allTimes.map((_, i) => {
    const v = Math.max(1e-12, additive * additive + (proportional * f0[i]!) ** 2);
    const J = jac[i]!;
    return J.map((a) => J.map((b) => (a * b) / v));
  });
  const current = Math.sqrt(quadraticForm(sigma0, g));
  const evaluate = (idx: readonly number[]): DesignValue => {
    const P = p0.map((r) => r.slice());
    for (const i of idx)
      for (let a = 0; a < n; a++) for (let b = 0; b < n; b++) P[a]![b]! += info[i]![a]![b]!;
    const cov = inverseSpd(P);
    const sd = cov ? Math.sqrt(quadraticForm(cov, g)) : current;
    return {
      draws: idx.map((i) => ({
        time: allTimes[i]!,
        doseIndex,
        hoursAfterDoseStart: allTimes[i]! - dose.time,
        hoursAfterInfusionEnd: allTimes[i]! - dose.time - T,
        predicted: f0[i]!,
      })),
      sdLogAuc24: sd,
      reduction: current > 0 ? 1 - sd / current : 0,
      logDetPrecision: logDet(P),
    };
  };
  const gridIdx = times.map((_, i) => i);
  const singles = gridIdx.map((i) => evaluate([i])).sort((a, b) => a.sdLogAuc24 - b.sdLogAuc24);
  let bestPair = evaluate([0, gridIdx.length - 1]);
  for (let i = 0; i < gridIdx.length; i++)
    for (let j = i + 1; j < gridIdx.length; j++) {
      const v = evaluate([i, j]);
      if (v.sdLogAuc24 < bestPair.sdLogAuc24 - 1e-12) bestPair = v;
    }
  const conventional = evaluate([times.length, times.length + 1]);
  const bestSingle = singles[0]!;
  const warnings: EngineWarning[] = [];
  if (!estimated.includes('CL')) {
    warnings.push({
      code: 'cl-fixed',
      message: 'CL is fixed in this model, so no draw can change the AUC24 uncertainty.',
    });
  }
  if (oralDose) {
    warnings.push({
      code: 'oral-peak-at-tmax-ss',
      message: `Oral/IM dose: the peak draw is at the steady-state tmax (${(peakTime - dose.time).toFixed(2)} h after the dose) of the current estimate; before steady state the true peak time differs a little.`,
    });
  }
  warnings.push({
    code: 'linearised-design',
    message:
      'Draw-time values come from a linearised (first-order) approximation around the current estimate; treat small differences as equal.',
  });
  return {
    currentSdLogAuc24: current,
    conventional,
    bestSingle,
    bestPair,
    alternatives: singles.slice(0, o.maxAlternatives),
    valueOfSecondLevel:
      bestSingle.sdLogAuc24 > 0 ? 1 - bestPair.sdLogAuc24 / bestSingle.sdLogAuc24 : 0,
    counters: { candidateTimes: times.length, modelEvaluations },
    warnings,
  };
}
