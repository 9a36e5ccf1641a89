/**
 * Bayesian maximum a posteriori (MAP) estimate of one patient's PK parameters.
 *
 * Model: θ_j = θ_pop,j·exp(η_j), η_j ~ N(0, ω_j²) independent (log-normal between-subject variability);
 * y_i = f_i(θ) + ε_i, Var ε_i = σ_i² = add² + (prop·f_i)² (combined residual error; additive-only or
 * proportional-only are the special cases). Sheiner LB, Beal SL. J Pharmacokinet Biopharm 1982;10:553
 * (Bayesian individualisation) — from memory.
 * Objective (−2·log posterior, constants dropped), minimised over η:
 *   OBJ(η) = Σ_quantified [ (y_i − f_i)²/σ_i² + ln σ_i² ]  +  Σ_BLQ [ −2·ln Φ((LLOQ_i − f_i)/σ_i) ]  +  Σ_j η_j²/ω_j²
 * The BLQ term is Beal's M3 likelihood: the probability mass below the limit (Beal SL. J Pharmacokinet
 * Pharmacodyn 2001;28:481–504). BLQ levels are flagged in the output, never treated as zero.
 * Optimiser: Nelder–Mead in η (log-parameter) space on the exact objective (see `nelderMead`), from several
 * deterministic starting points, each restarted once at its optimum.
 * Uncertainty: Laplace approximation at the optimum — Cov(η) ≈ 2·H⁻¹ with H the central-difference Hessian of
 * OBJ in η (OBJ = −2 ln p, so the Hessian of −ln p is H/2). Standard errors on the parameter scale by the delta
 * method, SE(θ) ≈ θ̂·SD(η); 90 % intervals θ̂·exp(±1.645·SD(η)) (log-normal).
 * Shrinkage (per parameter): the expected η-shrinkage of this sampling design, 1 − √(1 − SD_post²/ω²),
 * which for a linear-Gaussian model equals the population η-shrinkage 1 − SD(η̂)/ω of Savic RM, Karlsson MO.
 * AAPS J 2009;11:558–569 (Var η̂ = ω² − Var_post). 0 = the data determine the parameter, 1 = the estimate
 * is the prior. `distanceFromPopulation` = η̂/ω (how many prior SDs the estimate lies from the typical value).
 */
import { EngineError } from '../errors';
import {
  exponentialModel,
  superposedConcentrations,
  type ExponentialModel,
} from '../regimen/linear-response';
import { validateDoses } from '../dosing/validate-doses';
import { concentrationsAt } from '../simulate';
import type { Dose, ModelStructure, PkParameters } from '../types';
import { validateLevels } from './dose-history';
import { numericalHessian } from './hessian';
import { inverseSpd } from './linalg';
import { nelderMead } from './nelder-mead';
import { logNormalCdf, Z_90 } from './normal';
import type { EngineWarning, MeasuredLevel, PopulationPrior } from './types';

export const PK_PARAMETER_NAMES = ['CL', 'V1', 'Q', 'V2', 'ka', 'F', 'tlag', 'Vmax', 'Km'] as const;
export type PkParameterName = (typeof PK_PARAMETER_NAMES)[number];

export interface MapFitOptions {
  /** Number of deterministic starting points (1–5): η = 0, +0.6ω, −0.6ω, then alternating signs. */
  readonly starts: number;
  /** Floor on the residual SD (mg/L) so an all-proportional model stays finite near zero concentration. */
  readonly sigmaFloor: number;
  /** Objective values within this of the best count as the same optimum. */
  readonly agreementTolerance: number;
  /** Warn when a parameter's shrinkage exceeds this. */
  readonly heavyShrinkage: number;
  /** Warn when |η/ω| exceeds this. */
  readonly farFromPopulation: number;
  /** Hessian step in η. */
  readonly hessianStep: number;
  /** Nelder–Mead evaluation cap per run. */
  readonly maxEvaluations: number;
  /** `auto`: exact exponential sums for linear IV/oral models, RK4 `concentrationsAt` otherwise. */
  readonly predictor: 'auto' | 'simulate';
}

export const mapFitDefaultOptions: Readonly<MapFitOptions> = Object.freeze({
  starts: 3,
  sigmaFloor: 1e-3,
  agreementTolerance: 1e-4,
  heavyShrinkage: 0.5,
  farFromPopulation: 2.5,
  hessianStep: 1e-3,
  maxEvaluations: 3000,
  predictor: 'auto',
});

export interface LevelFit {
  readonly time: number;
  readonly observed: number;
  /** True when the level was below the assay's limit (M3 likelihood used). */
  readonly blq: boolean;
  /** Individual (MAP) prediction, mg/L. */
  readonly individual: number;
  /** Population (typical-value) prediction, mg/L. */
  readonly population: number;
  /** observed − individual (null for BLQ). */
  readonly residual: number | null;
  /** (observed − individual)/σ(individual) (IWRES; null for BLQ). */
  readonly weightedResidual: number | null;
  readonly populationResidual: number | null;
  readonly populationWeightedResidual: number | null;
}

export interface MapFitResult {
  readonly outcome: 'converged' | 'not-converged';
  /** All parameters, estimated and fixed. */
  readonly parameters: PkParameters;
  /** Estimated parameters only. */
  readonly estimates: Record<string, number>;
  /** Estimated parameter names, in η order. */
  readonly estimated: string[];
  readonly eta: Record<string, number>;
  /** Laplace standard errors on the parameter scale (delta method); absent if the Hessian is not positive definite. */
  readonly standardErrors: Record<string, number> | undefined;
  readonly intervals90: Record<string, readonly [number, number]> | undefined;
  /** Posterior covariance of η (log-parameters), same order as `estimated`. */
  readonly covarianceEta: number[][] | undefined;
  readonly shrinkage: Record<string, number> | undefined;
  readonly distanceFromPopulation: Record<string, number>;
  readonly levels: LevelFit[];
  /** −2·log posterior at the optimum (constants dropped). */
  readonly objective: number;
  /** Parts of the objective. */
  readonly objectiveParts: { readonly data: number; readonly prior: number };
  readonly counters: {
    readonly evaluations: number;
    readonly starts: number;
    readonly startsAgreeing: number;
    readonly iterations: number;
  };
  readonly warnings: EngineWarning[];
}

export interface MapFitInput {
  readonly model: ModelStructure;
  readonly prior: PopulationPrior;
  readonly doses: readonly Dose[];
  readonly levels: readonly MeasuredLevel[];
  /** Warnings from building the prior (e.g. covariates outside the model's range), passed through. */
  readonly priorWarnings?: readonly EngineWarning[];
  readonly options?: Partial<MapFitOptions>;
}

/** Build a prediction function θ → concentrations at the level times. */
export function makePredictor(
  model: ModelStructure,
  doses: readonly Dose[],
  times: readonly number[],
  predictor: MapFitOptions['predictor'] = 'auto',
): (p: PkParameters) => number[] {
  const oral = doses.some((d) => d.route === 'oral');
  if (predictor === 'auto' && model.elimination === 'linear') {
    return (p) => {
      let m: ExponentialModel;
      try {
        m = exponentialModel(model, p, oral);
      } catch (e) {
        if (e instanceof EngineError && e.code === 'invalid-input')
          return times.map(() => Number.NaN);
        throw e;
      }
      return superposedConcentrations(m, doses, times);
    };
  }
  return (p) => concentrationsAt(model, p, doses, times);
}

function validatePrior(fn: string, model: ModelStructure, prior: PopulationPrior): string[] {
  if (
    prior == null ||
    typeof prior !== 'object' ||
    prior.typical == null ||
    typeof prior.typical !== 'object'
  ) {
    throw new EngineError(
      'invalid-input',
      `${fn}: prior.typical must be an object of parameter values`,
      'prior.typical',
    );
  }
  const variability = prior.variability ?? {};
  for (const [k, v] of Object.entries(prior.typical)) {
    if (!(PK_PARAMETER_NAMES as readonly string[]).includes(k)) {
      throw new EngineError(
        'invalid-input',
        `${fn}: prior.typical.${k} is not a known parameter (${PK_PARAMETER_NAMES.join(', ')})`,
        `typical.${k}`,
      );
    }
    if (!Number.isFinite(v) || v <= 0) {
      throw new EngineError(
        'invalid-input',
        `${fn}: prior.typical.${k} must be a positive number`,
        `typical.${k}`,
      );
    }
  }
  const estimated: string[] = [];
  for (const [k, w] of Object.entries(variability)) {
    if (!(k in prior.typical)) {
      throw new EngineError(
        'invalid-input',
        `${fn}: variability.${k} has no typical value`,
        `variability.${k}`,
      );
    }
    if (!Number.isFinite(w) || w < 0) {
      throw new EngineError(
        'invalid-input',
        `${fn}: variability.${k} (omega, SD of ln ${k}) must be ≥ 0`,
        `variability.${k}`,
      );
    }
    if (w > 0) estimated.push(k);
  }
  const re = prior.residualError;
  if (re == null || typeof re !== 'object') {
    throw new EngineError(
      'invalid-input',
      `${fn}: residualError {additive, proportional} is required`,
      'residualError',
    );
  }
  for (const f of ['additive', 'proportional'] as const) {
    if (!Number.isFinite(re[f]) || re[f] < 0) {
      throw new EngineError(
        'invalid-input',
        `${fn}: residualError.${f} must be a number ≥ 0`,
        `residualError.${f}`,
      );
    }
  }
  if (re.additive === 0 && re.proportional === 0) {
    throw new EngineError(
      'invalid-input',
      `${fn}: residualError needs additive or proportional > 0`,
      'residualError',
    );
  }
  if (
    model == null ||
    typeof model !== 'object' ||
    (model.compartments !== 1 && model.compartments !== 2)
  ) {
    throw new EngineError(
      'unknown-model',
      `${fn}: model must be {compartments: 1|2, elimination}; got ${JSON.stringify(model)}`,
      'model',
    );
  }
  if (model.elimination !== 'linear' && model.elimination !== 'michaelis-menten') {
    throw new EngineError(
      'unknown-model',
      `${fn}: model.elimination must be "linear" or "michaelis-menten"`,
      'model.elimination',
    );
  }
  return estimated;
}

/**
 * MAP fit of the estimated parameters (those with omega > 0) to the measured levels.
 * @throws EngineError `no-levels`, `invalid-input` (naming the field, e.g. `levels[2].value`),
 *   `level-before-first-dose`, `unknown-model`, `no-estimable-parameters`.
 * @example
 * fitMap({ model: { compartments: 1, elimination: 'linear' },
 *   prior: { typical: { CL: 4, V1: 50 }, variability: { CL: 0.3, V1: 0.2 }, residualError: { additive: 1, proportional: 0.1 } },
 *   doses: [{ time: 0, amount: 1000, route: 'infusion', duration: 1 }], levels: [{ time: 11.5, value: 9 }] }).estimates
 * // => { CL: …, V1: … }
 */
export function fitMap(input: MapFitInput): MapFitResult {
  const fn = 'fitMap';
  if (input == null || typeof input !== 'object')
    throw new EngineError('invalid-input', `${fn}: input must be an object`, 'input');
  const o: MapFitOptions = { ...mapFitDefaultOptions, ...(input.options ?? {}) };
  const { model, prior } = input;
  const estimated = validatePrior(fn, model, prior);
  if (!Array.isArray(input.doses) || input.doses.length === 0) {
    throw new EngineError('invalid-input', `${fn}: doses must be a non-empty array`, 'doses');
  }
  validateDoses(input.doses, fn);
  const firstDose = Math.min(
    ...input.doses.map((d) => (d && Number.isFinite(d.time) ? d.time : Number.POSITIVE_INFINITY)),
  );
  validateLevels(fn, input.levels, Number.isFinite(firstDose) ? firstDose : undefined);
  if (estimated.length === 0) {
    throw new EngineError(
      'no-estimable-parameters',
      `${fn}: no parameter has variability > 0, so there is nothing to estimate`,
      'variability',
    );
  }
  const levels = input.levels;
  const isBlq = levels.map((l) => l.blq === true || (l.lloq !== undefined && l.value < l.lloq));
  const limitOf = levels.map((l, i) => {
    if (!isBlq[i]) return Number.NaN;
    const lim = l.lloq ?? l.value;
    if (!(lim > 0)) {
      throw new EngineError(
        'invalid-input',
        `${fn}: levels[${i}] is below the limit but has no lloq`,
        `levels[${i}].lloq`,
      );
    }
    return lim;
  });
  const predict = makePredictor(
    model,
    input.doses,
    levels.map((l) => l.time),
    o.predictor,
  );
  const typical = prior.typical as Record<string, number>;
  const omegas = estimated.map((k) => prior.variability[k]!);
  const { additive, proportional } = prior.residualError;
  const floor2 = o.sigmaFloor * o.sigmaFloor;
  const variance = (f: number): number =>
    Math.max(floor2, additive * additive + (proportional * f) ** 2);
  const paramsOf = (eta: readonly number[]): PkParameters => {
    const p: Record<string, number> = { ...typical };
    estimated.forEach((k, j) => (p[k] = typical[k]! * Math.exp(eta[j]!)));
    return p as unknown as PkParameters;
  };
  let evaluations = 0;
  const dataPart = (f: readonly number[]): number => {
    let s = 0;
    for (let i = 0; i < levels.length; i++) {
      const fi = f[i]!;
      if (!Number.isFinite(fi)) return Number.POSITIVE_INFINITY;
      const v = variance(fi);
      if (isBlq[i]) s += -2 * logNormalCdf((limitOf[i]! - fi) / Math.sqrt(v));
      else s += (levels[i]!.value - fi) ** 2 / v + Math.log(v);
    }
    return s;
  };
  const priorPart = (eta: readonly number[]): number =>
    eta.reduce((s, e, j) => s + (e / omegas[j]!) ** 2, 0);
  const objective = (eta: readonly number[]): number => {
    evaluations++;
    if (eta.some((e, j) => Math.abs(e / omegas[j]!) > 12)) return Number.POSITIVE_INFINITY;
    return dataPart(predict(paramsOf(eta))) + priorPart(eta);
  };

  // Starting points: 0, ±0.6ω, alternating ±0.6ω.
  const starts: number[][] = [
    omegas.map(() => 0),
    omegas.map((w) => 0.6 * w),
    omegas.map((w) => -0.6 * w),
    omegas.map((w, j) => (j % 2 === 0 ? 0.6 : -0.6) * w),
    omegas.map((w, j) => (j % 2 === 0 ? -0.6 : 0.6) * w),
  ].slice(0, Math.max(1, Math.min(5, Math.round(o.starts))));
  const runs = starts.map((x0) => {
    const nmOpts = { initialStep: omegas.map((w) => 0.5 * w), maxEvaluations: o.maxEvaluations };
    const first = nelderMead(objective, x0, nmOpts);
    const again = nelderMead(objective, first.x, {
      ...nmOpts,
      initialStep: omegas.map((w) => 0.05 * w),
    });
    return { ...again, outcome: again.outcome, iterations: first.iterations + again.iterations };
  });
  const best = runs.reduce((a, b) => (b.value < a.value ? b : a));
  const agreeing = runs.filter(
    (r) => Math.abs(r.value - best.value) <= o.agreementTolerance,
  ).length;
  const warnings: EngineWarning[] = [...(input.priorWarnings ?? [])];
  const converged = best.outcome === 'converged';
  if (!converged) {
    warnings.push({
      code: 'not-converged',
      message:
        'The optimiser stopped at its evaluation limit before converging; treat the estimate with caution.',
    });
  }
  if (runs.length > 1 && agreeing < runs.length) {
    warnings.push({
      code: 'starts-disagree',
      message: `${runs.length - agreeing} of ${runs.length} starting points ended at a worse optimum; the best is reported, but the fit may have more than one solution.`,
    });
  }

  const eta = best.x;
  const p = paramsOf(eta);
  const fInd = predict(p);
  const fPop = predict(paramsOf(omegas.map(() => 0)));
  // The Hessian's evaluations go through `objective`, so `evaluations` counts them too.
  const { hessian } = numericalHessian(objective, eta, o.hessianStep);
  const hInv = inverseSpd(hessian);
  let covarianceEta: number[][] | undefined;
  let standardErrors: Record<string, number> | undefined;
  let intervals90: Record<string, readonly [number, number]> | undefined;
  let shrinkage: Record<string, number> | undefined;
  if (hInv) {
    covarianceEta = hInv.map((row) => row.map((v) => 2 * v));
    standardErrors = {};
    intervals90 = {};
    shrinkage = {};
    for (let j = 0; j < estimated.length; j++) {
      const k = estimated[j]!;
      const sd = Math.sqrt(covarianceEta[j]![j]!);
      const th = (p as unknown as Record<string, number>)[k]!;
      standardErrors[k] = th * sd;
      intervals90[k] = [th * Math.exp(-Z_90 * sd), th * Math.exp(Z_90 * sd)];
      const ratio = Math.min(1, (sd / omegas[j]!) ** 2);
      shrinkage[k] = 1 - Math.sqrt(1 - ratio);
      if (shrinkage[k]! > o.heavyShrinkage) {
        warnings.push({
          code: 'heavy-shrinkage',
          message: `${k}: shrinkage ${(100 * shrinkage[k]!).toFixed(0)} %; the levels say little about ${k}, so its estimate stays close to the population value.`,
        });
      }
    }
  } else {
    warnings.push({
      code: 'uncertainty-unavailable',
      message:
        'The objective is not curved at the optimum in every direction (Hessian not positive definite); standard errors are not reported.',
    });
  }
  const distanceFromPopulation: Record<string, number> = {};
  estimated.forEach((k, j) => {
    distanceFromPopulation[k] = eta[j]! / omegas[j]!;
    if (Math.abs(distanceFromPopulation[k]!) > o.farFromPopulation) {
      warnings.push({
        code: 'far-from-population',
        message: `${k} is ${Math.abs(distanceFromPopulation[k]!).toFixed(1)} prior SDs from the population value; check dose and sample times and the model's suitability.`,
      });
    }
  });
  const quantified = isBlq.filter((b) => !b).length;
  if (quantified <= 1) {
    warnings.push({
      code: 'single-level',
      message: `The estimate rests on ${quantified} measurable level${quantified === 1 ? '' : 's'}; parameters the level cannot separate stay near the prior.`,
    });
  }
  if (isBlq.some((b) => b)) {
    warnings.push({
      code: 'blq-levels',
      message: `${isBlq.filter((b) => b).length} level(s) below the assay limit were used as censored observations (M3).`,
    });
  }
  const levelFits: LevelFit[] = levels.map((l, i) => {
    const fi = fInd[i]!;
    const fp = fPop[i]!;
    const blq = isBlq[i]!;
    return {
      time: l.time,
      observed: l.value,
      blq,
      individual: fi,
      population: fp,
      residual: blq ? null : l.value - fi,
      weightedResidual: blq ? null : (l.value - fi) / Math.sqrt(variance(fi)),
      populationResidual: blq ? null : l.value - fp,
      populationWeightedResidual: blq ? null : (l.value - fp) / Math.sqrt(variance(fp)),
    };
  });
  const estimates: Record<string, number> = {};
  const etaOut: Record<string, number> = {};
  estimated.forEach((k, j) => {
    estimates[k] = (p as unknown as Record<string, number>)[k]!;
    etaOut[k] = eta[j]!;
  });
  const prPart = priorPart(eta);
  return {
    outcome: converged ? 'converged' : 'not-converged',
    parameters: p,
    estimates,
    estimated,
    eta: etaOut,
    standardErrors,
    intervals90,
    covarianceEta,
    shrinkage,
    distanceFromPopulation,
    levels: levelFits,
    objective: best.value,
    objectiveParts: { data: best.value - prPart, prior: prPart },
    counters: {
      evaluations,
      starts: runs.length,
      startsAgreeing: agreeing,
      iterations: runs.reduce((s, r) => s + r.iterations, 0),
    },
    warnings,
  };
}

/**
 * Typical-individual (population-only, a priori) prediction for a first dose or any planned doses:
 * concentrations from the prior's typical parameters (already adjusted for covariates) by `simulate`'s
 * RK4 (`concentrationsAt`), with a warning that no level informs it.
 * @throws EngineError as `concentrationsAt`.
 * @example populationPrediction({ model, prior, doses, times: [1, 12] }).concentrations // => [.., ..]
 */
export function populationPrediction(input: {
  readonly model: ModelStructure;
  readonly prior: Pick<PopulationPrior, 'typical'>;
  readonly doses: readonly Dose[];
  readonly times: readonly number[];
  readonly priorWarnings?: readonly EngineWarning[];
}): { parameters: PkParameters; concentrations: number[]; warnings: EngineWarning[] } {
  const parameters = { ...input.prior.typical } as unknown as PkParameters;
  const concentrations = concentrationsAt(input.model, parameters, input.doses, input.times);
  return {
    parameters,
    concentrations,
    warnings: [
      ...(input.priorWarnings ?? []),
      {
        code: 'population-only',
        message:
          'Population prediction for a typical patient with these covariates; no measured level informs it, and individual patients vary widely around it.',
      },
    ],
  };
}
