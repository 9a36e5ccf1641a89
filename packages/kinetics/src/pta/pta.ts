/**
 * Probability of target attainment (PTA) by Monte Carlo simulation of virtual patients.
 *
 * Virtual patient i: η = L·z_i with z_i standard normal from its own seeded stream (`streamSeed(seed, i)`),
 * L the Cholesky factor of the log-parameter covariance — diagonal ω² for the population prior, or the Laplace
 * posterior covariance after a fit (`fitMap().covarianceEta`) — and θ = θ_centre·exp(η).
 * Each regimen is a maintenance regimen repeated to steady state (the same virtual patients for every regimen:
 * common random numbers, so regimens compare without extra noise).
 * Exposure per patient: AUC24,ss = F·daily dose/CL (pk-reference A7, exact for linear models); peak and trough
 * by the steady-state exponential-sum closed forms (`steadyStateConcentration`, pk-reference A5/A6) — exact,
 * no numerical integration.
 * Other regimen kinds (`PtaRegimen.regimenKind`; the salt factor S multiplies every dose):
 * - `oral` / `intramuscular` (linear): AUC24,ss = F·S·daily dose/CL (A7); peak at tmax,ss and pre-dose trough by
 *   the oral steady-state closed form (Gibaldi & Perrier ch. 3; pk-reference A4, `steadyStateOralConcentration`).
 * - `continuous-infusion` (linear): Css = R0/CL with R0 = S·amount/interval (A2); AUC24 = Css·24; peak = trough = Css.
 * - Michaelis-Menten models: R = S·F·amount/interval (F only for oral), Css = Km·R/(Vmax − R) (Winter ME, Basic
 *   Clinical Pharmacokinetics, phenytoin chapter — from memory; pk-reference A8). A virtual patient with R ≥ Vmax
 *   has no steady state: counted as not attaining and reported in `noSteadyState`. Only `css` and `auc24`
 *   (taken as Css·24) targets are available, plus peak/trough for continuous infusion; intermittent peak/trough
 *   would need a simulation per patient and are refused.
 * Chunking: `range` selects patients [start, end); counts from disjoint ranges add up (`mergePtaResults`)
 * to exactly the unchunked result.
 * PTA = attained/n; its Monte Carlo standard error √(p(1 − p)/n) is reported.
 */
import { EngineError } from '../errors';
import { cholesky } from '../estimation/linalg';
import type { PopulationPrior } from '../estimation/types';
import type { EngineWarning } from '../estimation/types';
import type { RegimenKind } from '../regimen/finder';
import {
  exponentialModel,
  oralSteadyStatePeak,
  steadyStateConcentration,
  steadyStateOralConcentration,
  type ExponentialModel,
} from '../regimen/linear-response';
import { targetsMet, validateTarget, type Exposure, type ExposureTarget } from '../regimen/targets';
import type { Dose, ModelStructure, PkParameters } from '../types';
import { fillStandardNormals, mulberry32, streamSeed } from './random';

/** Where virtual patients come from. */
export type PtaSource =
  | {
      readonly kind: 'population';
      readonly prior: Pick<PopulationPrior, 'typical' | 'variability'>;
    }
  | {
      readonly kind: 'posterior';
      /** All parameters at the posterior mode (`fitMap().parameters`). */
      readonly parameters: Readonly<Record<string, number>>;
      /** Names in covariance order (`fitMap().estimated`). */
      readonly estimated: readonly string[];
      /** Covariance of ln parameters (`fitMap().covarianceEta`). */
      readonly covarianceEta: readonly (readonly number[])[];
    };

export interface PtaRegimen {
  /** Dose as given, mg (continuous infusion: the amount infused per `interval`). */
  readonly amount: number;
  readonly interval: number;
  /** Infusion time, h (0 = bolus); ignored for oral/IM and continuous infusion. */
  readonly infusionDuration: number;
  /** Default `intermittent-infusion` (the original behaviour). */
  readonly regimenKind?: RegimenKind;
  /** Salt factor S (phenytoin sodium 0.92); default 1. */
  readonly saltFactor?: number;
}

export interface PtaInput {
  readonly model: ModelStructure;
  readonly source: PtaSource;
  readonly regimens: readonly PtaRegimen[];
  readonly target: ExposureTarget;
  /** Virtual patients in the whole run. */
  readonly n: number;
  /** Master seed (integer). */
  readonly seed: number;
  /** Peak evaluated this many h after the end of the infusion. */
  readonly peakDelay?: number;
  /** Patients [start, end) to simulate in this call (default all). */
  readonly range?: readonly [number, number];
}

export interface PtaRegimenResult {
  readonly regimen: PtaRegimen;
  readonly attained: number;
  readonly evaluated: number;
  readonly probability: number;
  /** Monte Carlo standard error of `probability`. */
  readonly standardError: number;
  /** Fraction meeting each target separately. */
  readonly perTarget: Record<string, number>;
  /** Per-target attained counts (for merging). */
  readonly perTargetCounts: Record<string, number>;
  /** Virtual patients with no steady state (Michaelis-Menten R ≥ Vmax), counted as not attaining. */
  readonly noSteadyState: number;
}

export interface PtaResult {
  readonly outcome: 'completed';
  readonly n: number;
  readonly seed: number;
  readonly range: readonly [number, number];
  readonly regimens: PtaRegimenResult[];
  readonly counters: { readonly virtualPatients: number; readonly modelEvaluations: number };
  readonly warnings: EngineWarning[];
}

function centreAndFactor(
  fn: string,
  source: PtaSource,
): { names: string[]; centre: Record<string, number>; L: number[][] } {
  if (source?.kind === 'population') {
    const names = Object.keys(source.prior.variability).filter(
      (k) => source.prior.variability[k]! > 0,
    );
    const L = names.map((a, i) =>
      names.map((_, j) => (i === j ? source.prior.variability[a]! : 0)),
    );
    return { names, centre: { ...source.prior.typical }, L };
  }
  if (source?.kind === 'posterior') {
    const n = source.estimated.length;
    const c = source.covarianceEta;
    if (!Array.isArray(c) || c.length !== n || c.some((r) => r.length !== n)) {
      throw new EngineError(
        'invalid-input',
        `${fn}: source.covarianceEta must be ${n}×${n}`,
        'source.covarianceEta',
      );
    }
    const L = cholesky(c);
    if (!L)
      throw new EngineError(
        'invalid-input',
        `${fn}: source.covarianceEta is not positive definite`,
        'source.covarianceEta',
      );
    return { names: [...source.estimated], centre: { ...source.parameters }, L };
  }
  throw new EngineError(
    'invalid-input',
    `${fn}: source.kind must be "population" or "posterior"`,
    'source.kind',
  );
}

/**
 * Monte Carlo PTA for each regimen (pure, synchronous; split it with `range` for a worker pool).
 * @throws EngineError `invalid-input` for n, seed, range, regimens, target or source; `not-linear`.
 * @example probabilityOfTargetAttainment({ model, source: { kind: 'population', prior }, regimens: [{ amount: 1000,
 *   interval: 12, infusionDuration: 1 }], target: { auc24: { min: 400, max: 600 } }, n: 1000, seed: 42 }).regimens[0].probability
 * // => 0.5…
 */
export function probabilityOfTargetAttainment(input: PtaInput): PtaResult {
  const fn = 'probabilityOfTargetAttainment';
  if (input == null || typeof input !== 'object')
    throw new EngineError('invalid-input', `${fn}: input must be an object`, 'input');
  if (!Number.isInteger(input.n) || input.n < 1)
    throw new EngineError('invalid-input', `${fn}: n must be a positive integer`, 'n');
  if (!Number.isInteger(input.seed))
    throw new EngineError('invalid-input', `${fn}: seed must be an integer`, 'seed');
  const [start, end] = input.range ?? [0, input.n];
  if (
    !Number.isInteger(start) ||
    !Number.isInteger(end) ||
    start < 0 ||
    end > input.n ||
    start > end
  ) {
    throw new EngineError(
      'invalid-input',
      `${fn}: range must be integers with 0 ≤ start ≤ end ≤ n`,
      'range',
    );
  }
  validateTarget(fn, input.target);
  if (!Array.isArray(input.regimens) || input.regimens.length === 0) {
    throw new EngineError('invalid-input', `${fn}: regimens must be a non-empty array`, 'regimens');
  }
  const mm = input.model?.elimination === 'michaelis-menten';
  input.regimens.forEach((r, i) => {
    const kind = r.regimenKind ?? 'intermittent-infusion';
    if (!KINDS.includes(kind))
      throw new EngineError(
        'invalid-input',
        `${fn}: regimens[${i}].regimenKind must be one of ${KINDS.join(', ')}`,
        `regimens[${i}].regimenKind`,
      );
    const S = r.saltFactor ?? 1;
    if (!(S > 0 && S <= 1))
      throw new EngineError(
        'invalid-input',
        `${fn}: regimens[${i}].saltFactor must be in (0, 1]`,
        `regimens[${i}].saltFactor`,
      );
    const infusionOk =
      kind !== 'intermittent-infusion' ||
      (r.infusionDuration >= 0 && r.infusionDuration < r.interval);
    if (!(r.amount >= 0) || !(r.interval > 0) || !infusionOk) {
      throw new EngineError(
        'invalid-input',
        `${fn}: regimens[${i}] needs amount ≥ 0, interval > 0 and 0 ≤ infusionDuration < interval`,
        `regimens[${i}]`,
      );
    }
    if (
      mm &&
      kind !== 'continuous-infusion' &&
      (input.target.peak || input.target.trough || input.target.peakToMic)
    ) {
      throw new EngineError(
        'invalid-input',
        `${fn}: Michaelis-Menten PTA uses the steady-state formula Css = Km·R/(Vmax − R); peak and trough of intermittent doses are not available (use target.css)`,
        'target',
      );
    }
  });
  const { names, centre, L } = centreAndFactor(fn, input.source);
  const peakDelay = input.peakDelay ?? 0;
  const k = names.length;
  const z = new Array<number>(k).fill(0);
  const kinds = input.regimens.map((r) => r.regimenKind ?? 'intermittent-infusion');
  const anyOral = kinds.some((x) => x === 'oral' || x === 'intramuscular');
  const doses: Dose[] = input.regimens.map((r) =>
    r.infusionDuration > 0
      ? {
          time: 0,
          amount: r.amount * (r.saltFactor ?? 1),
          route: 'infusion',
          duration: r.infusionDuration,
        }
      : { time: 0, amount: r.amount * (r.saltFactor ?? 1), route: 'bolus' },
  );
  const attained = input.regimens.map(() => 0);
  const noSteadyState = input.regimens.map(() => 0);
  const perTarget = input.regimens.map(() => ({}) as Record<string, number>);
  const warnings: EngineWarning[] = [];
  if (mm && input.target.auc24 && kinds.some((x) => x !== 'continuous-infusion')) {
    warnings.push({
      code: 'mm-auc24-from-css',
      message:
        'Michaelis-Menten AUC24 is taken as Css·24 from the constant-input formula; with intermittent doses the true interval average is slightly higher.',
    });
  }
  let modelEvaluations = 0;
  const p: Record<string, number> = { ...centre };
  for (let i = start; i < end; i++) {
    fillStandardNormals(mulberry32(streamSeed(input.seed, i)), z);
    for (let a = 0; a < k; a++) {
      let eta = 0;
      for (let b = 0; b <= a; b++) eta += L[a]![b]! * z[b]!;
      p[names[a]!] = centre[names[a]!]! * Math.exp(eta);
    }
    const m = mm ? undefined : exponentialModel(input.model, p as unknown as PkParameters, anyOral);
    if (mm) requireMichaelisMenten(fn, p);
    modelEvaluations++;
    for (let r = 0; r < doses.length; r++) {
      const reg = input.regimens[r]!;
      const e = mm
        ? mmExposure(p, reg, kinds[r]!)
        : linearExposure(m!, reg, kinds[r]!, doses[r]!, peakDelay);
      if (e === undefined) {
        noSteadyState[r]!++;
        for (const key of targetKeys(input.target)) perTarget[r]![key] ??= 0;
        continue;
      }
      const met = targetsMet(e, input.target);
      if (met.all) attained[r]!++;
      for (const [key, ok] of Object.entries(met.each))
        if (ok) perTarget[r]![key] = (perTarget[r]![key] ?? 0) + 1;
      for (const key of Object.keys(met.each)) perTarget[r]![key] ??= 0;
    }
  }
  const evaluated = end - start;
  if (noSteadyState.some((x) => x > 0)) {
    warnings.push({
      code: 'no-steady-state',
      message:
        'Some virtual patients have an input rate at or above their Vmax: no steady state. They count as not attaining (see noSteadyState).',
    });
  }
  return {
    outcome: 'completed',
    n: input.n,
    seed: input.seed,
    range: [start, end],
    regimens: input.regimens.map((regimen, r) =>
      summarise(regimen, attained[r]!, evaluated, perTarget[r]!, noSteadyState[r]!),
    ),
    counters: { virtualPatients: evaluated, modelEvaluations },
    warnings,
  };
}

const KINDS: readonly RegimenKind[] = [
  'intermittent-infusion',
  'oral',
  'intramuscular',
  'continuous-infusion',
];

function targetKeys(t: ExposureTarget): string[] {
  return (['auc24', 'trough', 'peak', 'css', 'peakToMic'] as const).filter(
    (k) => t[k] !== undefined,
  );
}

function requireMichaelisMenten(fn: string, p: Record<string, number>): void {
  for (const key of ['Vmax', 'Km'] as const)
    if (!(p[key]! > 0))
      throw new EngineError(
        'invalid-input',
        `${fn}: Michaelis-Menten PTA needs a positive ${key} in the source parameters`,
        `source.${key}`,
      );
}

/** Linear exposure of one regimen for one virtual patient (see the module doc for the equations). */
function linearExposure(
  m: ExponentialModel,
  reg: PtaRegimen,
  kind: RegimenKind,
  d: Dose,
  peakDelay: number,
): Exposure {
  const S = reg.saltFactor ?? 1;
  if (kind === 'continuous-infusion') {
    // Css = R0/CL (pk-reference A2).
    const css = (S * reg.amount) / reg.interval / m.CL;
    return { auc24: css * 24, peak: css, trough: css, css };
  }
  if (kind === 'oral' || kind === 'intramuscular') {
    const active = S * reg.amount;
    return {
      // AUC24,ss = F·daily dose/CL (pk-reference A7).
      auc24: (m.F * active * 24) / reg.interval / m.CL,
      peak: oralSteadyStatePeak(m, active, reg.interval).concentration,
      trough: steadyStateOralConcentration(m, active, reg.interval, 0),
    };
  }
  const peak = steadyStateConcentration(
    m,
    d,
    reg.interval,
    Math.min(reg.infusionDuration + peakDelay, reg.interval),
  );
  const trough = steadyStateConcentration(m, d, reg.interval, reg.interval);
  // IV: F = 1; AUC24,ss = daily dose/CL (pk-reference A7).
  const auc24 = (S * reg.amount * 24) / reg.interval / m.CL;
  return { auc24, peak, trough };
}

/**
 * Michaelis-Menten exposure for one virtual patient: Css = Km·R/(Vmax − R), R = S·F·amount/interval (A8);
 * undefined when R ≥ Vmax (no steady state).
 */
function mmExposure(
  p: Record<string, number>,
  reg: PtaRegimen,
  kind: RegimenKind,
): Exposure | undefined {
  const F = kind === 'oral' || kind === 'intramuscular' ? (p.F ?? 1) : 1;
  const R = (F * (reg.saltFactor ?? 1) * reg.amount) / reg.interval;
  const vmax = p.Vmax!;
  if (R >= vmax) return undefined;
  const css = (p.Km! * R) / (vmax - R);
  return { auc24: css * 24, peak: css, trough: css, css };
}

function summarise(
  regimen: PtaRegimen,
  att: number,
  evaluated: number,
  counts: Record<string, number>,
  noSteadyState: number,
): PtaRegimenResult {
  const pr = evaluated > 0 ? att / evaluated : 0;
  const perTarget: Record<string, number> = {};
  for (const [key, c] of Object.entries(counts)) perTarget[key] = evaluated > 0 ? c / evaluated : 0;
  return {
    regimen,
    attained: att,
    evaluated,
    probability: pr,
    standardError: evaluated > 0 ? Math.sqrt((pr * (1 - pr)) / evaluated) : 0,
    perTarget,
    perTargetCounts: { ...counts },
    noSteadyState,
  };
}

/** Split patients [0, n) into `chunks` contiguous ranges (as equal as possible). */
export function ptaChunks(n: number, chunks: number): [number, number][] {
  const c = Math.max(1, Math.min(n, Math.floor(chunks)));
  const out: [number, number][] = [];
  for (let i = 0; i < c; i++) out.push([Math.floor((i * n) / c), Math.floor(((i + 1) * n) / c)]);
  return out;
}

/**
 * Merge results of disjoint chunks of one run (same n, seed, regimens) into the whole-run result.
 * @throws EngineError `invalid-input` if the chunks disagree on n/seed/regimens or overlap.
 */
export function mergePtaResults(parts: readonly PtaResult[]): PtaResult {
  const fn = 'mergePtaResults';
  if (parts.length === 0)
    throw new EngineError('invalid-input', `${fn}: nothing to merge`, 'parts');
  const first = parts[0]!;
  const sorted = [...parts].sort((a, b) => a.range[0] - b.range[0]);
  for (let i = 0; i < sorted.length; i++) {
    const p = sorted[i]!;
    if (p.n !== first.n || p.seed !== first.seed || p.regimens.length !== first.regimens.length) {
      throw new EngineError('invalid-input', `${fn}: parts come from different runs`, 'parts');
    }
    if (i > 0 && p.range[0] < sorted[i - 1]!.range[1])
      throw new EngineError('invalid-input', `${fn}: chunks overlap`, 'parts');
  }
  const evaluated = sorted.reduce((s, p) => s + (p.range[1] - p.range[0]), 0);
  const regimens = first.regimens.map((r0, r) => {
    const att = sorted.reduce((s, p) => s + p.regimens[r]!.attained, 0);
    const counts: Record<string, number> = {};
    for (const p of sorted)
      for (const [k, c] of Object.entries(p.regimens[r]!.perTargetCounts))
        counts[k] = (counts[k] ?? 0) + c;
    const nss = sorted.reduce((s, p) => s + (p.regimens[r]!.noSteadyState ?? 0), 0);
    return summarise(r0.regimen, att, evaluated, counts, nss);
  });
  return {
    outcome: 'completed',
    n: first.n,
    seed: first.seed,
    range: [sorted[0]!.range[0], sorted[sorted.length - 1]!.range[1]],
    regimens,
    counters: {
      virtualPatients: sorted.reduce((s, p) => s + p.counters.virtualPatients, 0),
      modelEvaluations: sorted.reduce((s, p) => s + p.counters.modelEvaluations, 0),
    },
    warnings: [
      ...new Map(sorted.flatMap((p) => p.warnings ?? []).map((w) => [w.code, w])).values(),
    ],
  };
}
