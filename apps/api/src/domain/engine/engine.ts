import type {
  FitRequest,
  FitResponse,
  LevelValidityResponse,
  Regimen,
  RegimenSearchRequest,
  RegimenSearchResponse,
  SamplingRequest,
  SamplingResponse,
  SimulateRequest,
  SimulateResponse,
  Target,
  Warning,
} from '@ebbtide/contracts';
import {
  assessLevels,
  concentrationsAt,
  findRegimens,
  fitMap,
  populationPrediction,
  maintenanceAfterPortions,
  oralLoadingPortions,
  regimenPresets,
  regimenSearchDefaultOptions,
  simulate,
  suggestSamplingTimes,
  twoLevelEstimate,
  type DesignValue,
  type Dose,
  type DrugModelEntry,
  type ExposureTarget,
  type MapFitResult,
  type PkParameters,
  type RegimenCandidate,
} from '@ebbtide/kinetics';
import type { Conn } from '../../data-access/casework-db';
import { AppError } from '../../lib/app-error';
import type { CaseworkActor } from '../patients/common';
import {
  atOf,
  CAUTION,
  engineRefused,
  hoursOf,
  loadEngineCase,
  uniqueWarnings,
  type EngineCase,
} from './context';

/** Above this shrinkage (0..1) the estimate says little beyond the prior. */
export const HEAVY_SHRINKAGE = 0.5;
/** Most points a simulate response returns. */
export const MAX_POINTS = 5000;

const modelRef = (c: EngineCase) => ({ id: c.ctx.model.id, version: c.ctx.model.version });
const asRecord = (p: PkParameters) => ({ ...(p as unknown as Record<string, number>) });

/**
 * The course target as the engine's ExposureTarget. For a Michaelis-Menten drug (phenytoin) a trough or
 * peak range is evaluated as the steady-state average (Css): levels fluctuate little within a dosing
 * interval at steady state, and the engine predicts Css for these models (pk-reference A8, E3).
 */
export function exposureTarget(
  target: Target,
  micMgL: number | null,
  warnings: Warning[],
  michaelisMenten = false,
): ExposureTarget {
  const range = {
    ...(target.low !== null ? { min: target.low } : {}),
    ...(target.high !== null ? { max: target.high } : {}),
  };
  if (michaelisMenten && (target.metric === 'trough' || target.metric === 'peak')) {
    warnings.push({
      code: 'target-as-css',
      message: `The ${target.metric} range is evaluated as the steady-state average concentration (Css), as the engine predicts for Michaelis-Menten kinetics.`,
    });
    return { css: range };
  }
  switch (target.metric) {
    case 'auc24':
      return { auc24: range };
    case 'trough':
      return { trough: range };
    case 'peak':
      return { peak: range };
    case 'css':
      return { css: range };
    case 'peak-mic-ratio':
      if (micMgL === null)
        warnings.push({
          code: 'mic-assumed',
          message: 'No MIC recorded: the peak/MIC target assumes MIC 1 mg/L.',
        });
      return { peakToMic: { min: target.low ?? target.high ?? 10, mic: micMgL ?? 1 } };
  }
}

function requireLevels(c: EngineCase, method: string): void {
  if (c.levels.length === 0) {
    throw new AppError(
      'no-levels',
      `A ${method} fit needs at least one measured level on this course`,
      422,
    );
  }
  if (c.doses.length === 0)
    throw new AppError('no-doses', 'Record the doses given before fitting', 422);
}

function map(c: EngineCase): MapFitResult {
  requireLevels(c, 'MAP');
  try {
    return fitMap({
      model: c.structure,
      prior: c.prior,
      doses: c.doses,
      levels: c.levels,
      priorWarnings: c.warnings,
    });
  } catch (error) {
    engineRefused(error);
  }
}

function mapWarnings(fit: MapFitResult): Warning[] {
  const w: Warning[] = [...fit.warnings];
  const heavy = Object.entries(fit.shrinkage ?? {}).filter(([, s]) => s > HEAVY_SHRINKAGE);
  if (heavy.length && !w.some((x) => x.code === 'heavy-shrinkage')) {
    w.push({
      code: 'heavy-shrinkage',
      message: `Heavy shrinkage toward the prior for ${heavy.map(([k]) => k).join(', ')}: the levels say little about them.`,
    });
  }
  return w;
}

/** Parameters to simulate with: the covariate-adjusted population prior or the MAP estimate. */
function parametersFor(
  c: EngineCase,
  which: 'population' | 'map',
): { parameters: PkParameters; warnings: Warning[] } {
  if (which === 'population') {
    return {
      parameters: { ...c.prior.typical } as unknown as PkParameters,
      warnings: [
        {
          code: 'population-only',
          message:
            'Population parameters for a typical patient with these covariates; no level informs them.',
        },
      ],
    };
  }
  const fit = map(c);
  return { parameters: fit.parameters, warnings: mapWarnings(fit) };
}

/**
 * The drug's oral loading portion, mg (drug model practical setting; for a model version stored before
 * the setting existed, the engine's preset for the drug), or undefined when loading doses are not split.
 */
export function oralLoadingPortionFor(
  drug: string,
  practical: { oralLoadingPortionMg?: unknown } | undefined,
): number | undefined {
  const own = practical?.oralLoadingPortionMg;
  if (typeof own === 'number' && own > 0) return own;
  const preset = regimenPresets[drug]?.oralLoadingPortion;
  return preset && preset > 0 ? preset : undefined;
}

const ROUTE_WORDS: Record<Dose['route'], string> = {
  infusion: 'IV infusion',
  bolus: 'IV bolus',
  oral: 'oral or IM (absorbed)',
};

/** The engine route of a regimen's route: oral and IM are absorbed whatever the infusion time says. */
export function engineRouteOf(r: Pick<Regimen, 'route' | 'infusionH'>): Dose['route'] {
  if (r.route === 'oral' || r.route === 'im') return 'oral';
  return r.infusionH === 0 || r.route === 'iv-bolus' ? 'bolus' : 'infusion';
}

/**
 * Why the drug model cannot give this route (e.g. vancomycin only by IV infusion), or null when it
 * can: a route the model was not built for is refused, never simulated.
 */
export function routeProblem(
  entry: Pick<DrugModelEntry, 'routes' | 'title'>,
  r: Pick<Regimen, 'route' | 'infusionH'>,
): string | null {
  const route = engineRouteOf(r);
  if (entry.routes.includes(route)) return null;
  return `${entry.title} covers ${entry.routes.map((x) => ROUTE_WORDS[x]).join(' and ')} only, not ${ROUTE_WORDS[route]}`;
}

/**
 * A planned regimen's doses from `start` (engine hours): refuses a route the model cannot give, gives an
 * oral loading dose in the drug's portions (phenytoin), then `count` maintenance doses every interval.
 * One builder for the casework engine and the teaching engine.
 */
export function plannedRegimenDoses(
  entry: DrugModelEntry,
  drug: string,
  r: Regimen,
  start: number,
): Dose[] {
  const problem = routeProblem(entry, r);
  if (problem)
    throw new AppError('validation-failed', problem, 400, {
      fieldErrors: { 'regimen.route': [problem] },
    });
  const route = engineRouteOf(r);
  const dose = (time: number, amount: number): Dose =>
    route === 'infusion' ? { time, amount, route, duration: r.infusionH } : { time, amount, route };
  const out: Dose[] = [];
  let t = start;
  const portionMg = oralLoadingPortionFor(drug, entry.practical);
  if (r.loadingDoseMg && route === 'oral' && portionMg) {
    // As the regimen finder and the plan give it: an oral loading dose in portions (phenytoin).
    const portions = oralLoadingPortions(r.loadingDoseMg, portionMg);
    for (const p of portions) out.push(dose(start + p.offsetH, p.amount));
    t = start + maintenanceAfterPortions(portions, r.intervalH);
  } else if (r.loadingDoseMg) {
    out.push(dose(t, r.loadingDoseMg));
    t += r.intervalH;
  }
  for (let i = 0; i < r.count; i++) out.push(dose(t + i * r.intervalH, r.doseMg));
  return out;
}

function regimenDoses(c: EngineCase, r: Regimen): { doses: Dose[]; start: number } {
  const last = c.doses[c.doses.length - 1];
  let start: number;
  if (r.startHour !== undefined || r.startAt !== undefined) {
    if (c.referenceAt === null && r.startAt !== undefined)
      throw new AppError('validation-failed', 'Teaching cases use startHour', 400, {
        fieldErrors: { startAt: ['teaching cases have no real dates: give startHour'] },
      });
    if (c.referenceAt !== null && r.startHour !== undefined)
      throw new AppError('validation-failed', 'Real patients use startAt', 400, {
        fieldErrors: { startHour: ['give startAt as an ISO date-time'] },
      });
    start = hoursOf(c.referenceAt, r.startAt ?? null, r.startHour ?? null);
  } else start = last ? last.time + r.intervalH : 0;
  const doses = plannedRegimenDoses(c.entry, c.ctx.course.drug, r, start);
  return { doses, start };
}

export async function simulateCourse(
  db: Conn,
  actor: CaseworkActor,
  courseId: string,
  req: SimulateRequest,
): Promise<SimulateResponse> {
  const c = await loadEngineCase(db, actor, courseId);
  const { parameters, warnings } = parametersFor(c, req.parameters);
  const planned = req.regimen ? regimenDoses(c, req.regimen) : null;
  const doses = [...c.doses, ...(planned?.doses ?? [])].sort((a, b) => a.time - b.time);
  if (doses.length === 0)
    throw new AppError('no-doses', 'Nothing to simulate: record a dose or give a regimen', 422);
  const first = doses[0] as Dose;
  const lastStart = (doses[doses.length - 1] as Dose).time;
  const from = Math.min(first.time, ...c.levels.map((l) => l.time));
  const to = lastStart + (req.regimen ? req.regimen.intervalH : req.horizonH);
  const step = Math.max(req.stepH, (to - from) / MAX_POINTS);
  const times: number[] = [];
  for (let i = 0; from + i * step <= to + 1e-9; i++) times.push(from + i * step);
  // Exposure over the last regimen interval (or the last 24 h simulated).
  const windowH = req.regimen ? req.regimen.intervalH : 24;
  const wFrom = Math.max(from, to - windowH);
  let result;
  try {
    result = simulate({
      model: c.structure,
      parameters,
      doses,
      outputTimes: times,
      aucWindows: [[wFrom, to]],
    });
  } catch (error) {
    engineRefused(error);
  }
  const inWindow = result.concentrations.filter((_, i) => (times[i] as number) >= wFrom - 1e-9);
  const auc = result.aucs[0] ?? null;
  if (result.outcome === 'inaccurate')
    warnings.push({
      code: 'integration-inaccurate',
      message: `The integrator's error estimate (${result.errorEstimate} mg/L) exceeds its tolerance.`,
    });
  return {
    model: modelRef(c),
    warnings: uniqueWarnings([...c.warnings, ...warnings]),
    caution: CAUTION,
    parameters: asRecord(parameters),
    points: times.map((hour, i) => ({
      hour,
      at: atOf(c.referenceAt, hour),
      concentrationMgL: result.concentrations[i] as number,
    })),
    exposure: {
      peakMgL: inWindow.length ? Math.max(...inWindow) : null,
      troughMgL: inWindow.length ? Math.min(...inWindow) : null,
      auc24: auc === null ? null : (auc * 24) / (to - wFrom),
    },
    errorEstimate: result.errorEstimate,
  };
}

export async function fitCourse(
  db: Conn,
  actor: CaseworkActor,
  courseId: string,
  req: FitRequest,
): Promise<FitResponse> {
  const c = await loadEngineCase(db, actor, courseId, { excludeLevelIds: req.excludeLevelIds });
  const population = { ...c.prior.typical };
  const levelTimes = c.levels.map((l) => l.time);
  const popPred = (): number[] => {
    if (c.doses.length === 0 || levelTimes.length === 0) return levelTimes.map(() => Number.NaN);
    try {
      return concentrationsAt(
        c.structure,
        population as unknown as PkParameters,
        c.doses,
        levelTimes,
      );
    } catch (error) {
      engineRefused(error);
    }
  };
  const predictions = (indiv: number[] | null, pop: number[]) =>
    c.levelRecords.map((l, i) => {
      const observed = c.levels[i]?.value as number;
      const predicted = indiv ? (indiv[i] ?? null) : null;
      return {
        levelId: l.id,
        hour: c.levels[i]?.time as number,
        observedMgL: observed,
        predictedMgL: predicted !== null && Number.isFinite(predicted) ? predicted : null,
        populationPredictedMgL: Number.isFinite(pop[i]) ? (pop[i] as number) : null,
        residualMgL: predicted !== null && Number.isFinite(predicted) ? observed - predicted : null,
      };
    });
  const base = {
    model: modelRef(c),
    caution: CAUTION,
    method: req.method,
    populationParameters: population,
    levelsUsed: c.levels.length,
  };
  if (req.method === 'population') {
    if (c.doses.length === 0) throw new AppError('no-doses', 'Record the doses given first', 422);
    const pop = popPred();
    const result = populationPrediction({
      model: c.structure,
      prior: c.prior,
      doses: c.doses,
      times: levelTimes,
      priorWarnings: c.warnings,
    });
    return {
      ...base,
      warnings: uniqueWarnings(result.warnings),
      parameters: asRecord(result.parameters),
      uncertainty: null,
      shrinkage: null,
      predictions: predictions(pop, pop),
    };
  }
  if (req.method === 'map') {
    const fit = map(c);
    const uncertainty = fit.intervals90
      ? Object.fromEntries(
          Object.entries(fit.intervals90).map(([k, [low, high]]) => [k, { low, high }]),
        )
      : null;
    return {
      ...base,
      warnings: uniqueWarnings([...c.warnings, ...mapWarnings(fit)]),
      parameters: asRecord(fit.parameters),
      uncertainty,
      shrinkage: fit.shrinkage ?? null,
      predictions: c.levelRecords.map((l, i) => {
        const lf = fit.levels[i];
        return {
          levelId: l.id,
          hour: c.levels[i]?.time as number,
          observedMgL: c.levels[i]?.value as number,
          predictedMgL: lf?.individual ?? null,
          populationPredictedMgL: lf?.population ?? null,
          residualMgL: lf?.residual ?? null,
        };
      }),
    };
  }
  // Two-level (Sawchuk-Zaske) log-linear method.
  requireLevels(c, 'two-level');
  let result;
  try {
    result = twoLevelEstimate({
      doses: c.doses.map((d) => ({
        time: d.time,
        amount: d.amount,
        duration: d.duration,
        route: d.route,
      })),
      levels: c.levels,
    });
  } catch (error) {
    engineRefused(error);
  }
  if (result.outcome === 'refused') {
    throw new AppError(
      'engine-refused',
      `The two-level method cannot use these levels: ${result.refusals.map((r) => r.message).join(' ')}`,
      422,
      {
        refusals: result.refusals,
      },
    );
  }
  const params = { CL: result.CL, V1: result.V };
  let indiv: number[] = [];
  try {
    indiv = concentrationsAt(
      { compartments: 1, elimination: 'linear' },
      params,
      c.doses,
      levelTimes,
    );
  } catch (error) {
    engineRefused(error);
  }
  const warnings = [...c.warnings, ...result.warnings];
  if (c.structure.compartments === 2) {
    warnings.push({
      code: 'one-compartment-method',
      message:
        'The two-level method treats the drug as one compartment; the library model has two.',
    });
  }
  return {
    ...base,
    warnings: uniqueWarnings(warnings),
    parameters: {
      CL: result.CL,
      V1: result.V,
      k: result.k,
      halfLife: result.halfLife,
      ...(result.auc24 !== undefined ? { auc24: result.auc24 } : {}),
    },
    uncertainty: null,
    shrinkage: null,
    predictions: predictions(indiv, popPred()),
  };
}

/** ln 2 × total volume / CL: the half-life used to judge steady state (terminal phase approximated). */
function typicalHalfLife(c: EngineCase): number | undefined {
  const t = c.prior.typical;
  if (t.CL && t.V1) return (Math.LN2 * (t.V1 + (t.V2 ?? 0))) / t.CL;
  return undefined;
}

export async function levelValidity(
  db: Conn,
  actor: CaseworkActor,
  courseId: string,
): Promise<LevelValidityResponse> {
  const c = await loadEngineCase(db, actor, courseId);
  if (c.levels.length === 0)
    return {
      model: modelRef(c),
      warnings: uniqueWarnings(c.warnings),
      caution: CAUTION,
      levels: [],
    };
  if (c.doses.length === 0)
    throw new AppError('no-doses', 'Record the doses given before checking levels', 422);
  let assessed;
  try {
    assessed = assessLevels({
      doses: c.doses,
      levels: c.levels,
      halfLife: typicalHalfLife(c),
      drug: c.ctx.course.drug,
    });
  } catch (error) {
    engineRefused(error);
  }
  const warnings = [...c.warnings];
  return {
    model: modelRef(c),
    warnings: uniqueWarnings(warnings),
    caution: CAUTION,
    levels: assessed.map((a) => {
      const record = c.levelRecords[a.level];
      return {
        levelId: record?.id as string,
        verdict:
          a.verdict === 'neither'
            ? 'discard'
            : a.verdict === 'bayesian-only'
              ? 'usable-bayesian'
              : 'usable-log-linear',
        engineVerdict: a.verdict,
        bayesian: a.bayesian,
        logLinear: a.logLinear,
        reasons: [
          ...new Set([a.bayesian.reason, a.logLinear.reason, ...a.notes.map((n) => n.message)]),
        ].filter(Boolean),
        hoursAfterInfusionEnd: a.hoursSinceDoseEnd ?? null,
      };
    }),
  };
}

function toRegimenResult(r: RegimenCandidate) {
  return {
    regimenKind: r.regimenKind,
    doseMg: r.amount,
    intervalH: r.interval,
    infusionH: r.infusionDuration,
    loadingDoseMg: r.loadingDose?.amount ?? null,
    loadingPortions: r.loadingDose?.portions ?? null,
    exposure: {
      peakMgL: r.steadyState.peak,
      troughMgL: r.steadyState.trough,
      auc24: r.steadyState.auc24,
    },
    meetsTarget: r.allTargetsMet,
    usualPractice: r.usualPractice,
    practicalityNotes: r.practicalityNotes,
  };
}

export async function searchRegimens(
  db: Conn,
  actor: CaseworkActor,
  courseId: string,
  req: RegimenSearchRequest,
): Promise<RegimenSearchResponse> {
  const c = await loadEngineCase(db, actor, courseId);
  const which = req.parameters === 'map' && c.levels.length === 0 ? 'population' : req.parameters;
  const extra: Warning[] = [];
  if (which !== req.parameters)
    extra.push({
      code: 'no-levels',
      message: 'No levels yet: regimens are from population parameters.',
    });
  const { parameters, warnings } = parametersFor(c, which);
  const target = req.target ?? c.ctx.course.target;
  const exposure = exposureTarget(
    target,
    c.ctx.course.micMgL,
    extra,
    c.structure.elimination === 'michaelis-menten',
  );
  const practical = c.entry.practical;
  const startTime =
    req.startHour !== undefined || req.startAt !== undefined
      ? hoursOf(c.referenceAt, req.startAt ?? null, req.startHour ?? null)
      : (c.doses[c.doses.length - 1]?.time ?? 0) + 12;
  const preset = regimenPresets[c.ctx.course.drug] ?? {};
  const mm = c.structure.elimination === 'michaelis-menten';
  // What is already on board when the regimen starts (from the doses given): a Michaelis-Menten loading
  // dose subtracts it; a linear one warns.
  let currentConcentration = 0;
  if (req.loadingDose && c.doses.length > 0) {
    try {
      currentConcentration = Math.max(
        0,
        simulate({
          model: c.structure,
          parameters,
          doses: c.doses.filter((d) => d.time < startTime),
          outputTimes: [startTime],
          options: { estimateError: false },
        }).concentrations[0] ?? 0,
      );
    } catch (error) {
      engineRefused(error);
    }
    if (mm && currentConcentration > 0)
      extra.push({
        code: 'loading-dose-allows-for-drug-on-board',
        message: `Loading doses allow for the ${currentConcentration.toFixed(1)} mg/L predicted when the regimen starts.`,
      });
  }
  let result;
  try {
    result = findRegimens({
      regimenKind: req.regimenKind ?? (mm ? 'oral' : undefined),
      model: c.structure,
      parameters,
      target: exposure,
      options: {
        ...preset,
        ...(practical
          ? { amountStep: practical.doseRoundingMg, intervals: practical.usualIntervalsH }
          : {}),
        ...(practical?.preferredIntervalsH
          ? { preferredIntervals: practical.preferredIntervalsH }
          : {}),
        ...(practical?.usualMaxSingleDoseMg
          ? { usualMaxSingleDose: practical.usualMaxSingleDoseMg }
          : {}),
        oralLoadingPortion: oralLoadingPortionFor(c.ctx.course.drug, practical) ?? 0,
        // A pharmacist who names the intervals has chosen them: no preference among them.
        ...(req.intervalsH ? { preferredIntervals: [] } : {}),
        ...(practical?.maxInfusionRateMgPerH
          ? { maxInfusionRate: practical.maxInfusionRateMgPerH }
          : {}),
        ...(practical?.defaultInfusionH ? { minInfusionDuration: practical.defaultInfusionH } : {}),
        ...(req.intervalsH ? { intervals: req.intervalsH } : {}),
        ...(req.infusionH !== undefined ? { minInfusionDuration: req.infusionH } : {}),
        ...(req.roundToMg ? { amountStep: req.roundToMg } : {}),
        ...(req.loadingDose !== undefined
          ? {
              loadingDose: {
                enabled: req.loadingDose,
                cap: preset.loadingDose?.cap ?? regimenSearchDefaultOptions.loadingDose.cap,
              },
            }
          : {}),
        currentConcentration,
        startTime,
      },
    });
  } catch (error) {
    engineRefused(error);
  }
  const regimens = result.candidates.map(toRegimenResult);
  // The finder already says why candidates were left out (no steady state); say it once.
  if (result.refused.length && !result.warnings.some((w) => w.code === 'no-steady-state')) {
    extra.push({
      code: 'regimens-refused',
      message: `${result.refused.length} candidate regimen(s) were left out: ${[...new Set(result.refused.map((r) => r.message))].slice(0, 2).join(' ')}`,
    });
  }
  if (result.outcome === 'no-regimen-meets-targets')
    extra.push({
      code: 'no-regimen-meets-target',
      message: 'No practical regimen meets every target; the closest are listed.',
    });
  return {
    model: modelRef(c),
    warnings: uniqueWarnings([...c.warnings, ...warnings, ...result.warnings, ...extra]),
    caution: CAUTION,
    target,
    regimens,
    suggestion: regimens.find((r) => r.meetsTarget) ?? null,
  };
}

export { map as fitMapFor, parametersFor };

/** Suggested draw times after a planned regimen, ranked by how much they shrink the AUC24 uncertainty. */
export async function suggestSampling(
  db: Conn,
  actor: CaseworkActor,
  courseId: string,
  req: SamplingRequest,
): Promise<SamplingResponse> {
  const c = await loadEngineCase(db, actor, courseId);
  if (c.structure.elimination !== 'linear') {
    throw new AppError(
      'engine-refused',
      'Sampling suggestions cover linear models; not Michaelis-Menten drugs (phenytoin).',
      422,
    );
  }
  const which = req.parameters === 'map' && c.levels.length === 0 ? 'population' : req.parameters;
  const warnings: Warning[] = [];
  let parameters: PkParameters;
  let estimated: string[];
  let covarianceEta: number[][];
  if (which === 'map') {
    const fit = map(c);
    if (!fit.covarianceEta)
      throw new AppError(
        'engine-refused',
        'The fit gave no posterior covariance: ask with population parameters.',
        422,
      );
    parameters = fit.parameters;
    estimated = fit.estimated;
    covarianceEta = fit.covarianceEta;
    warnings.push(...mapWarnings(fit));
  } else {
    if (which !== req.parameters)
      warnings.push({
        code: 'no-levels',
        message: 'No levels yet: suggestions use the population prior.',
      });
    parameters = { ...c.prior.typical } as unknown as PkParameters;
    estimated = Object.keys(c.prior.variability).filter((k) => (c.prior.variability[k] ?? 0) > 0);
    covarianceEta = estimated.map((a, i) =>
      estimated.map((_, j) => (i === j ? (c.prior.variability[a] ?? 0) ** 2 : 0)),
    );
  }
  const planned = regimenDoses(c, req.regimen);
  const doses = [...c.doses, ...planned.doses].sort((a, b) => a.time - b.time);
  if (req.regimen.count < 2) {
    throw new AppError(
      'validation-failed',
      'Plan at least two doses: a draw is timed within a dosing interval',
      400,
      {
        fieldErrors: { 'regimen.count': ['at least 2 for sampling suggestions'] },
      },
    );
  }
  // The sampled dose must be followed by another one (its interval needs an end); default the last but one.
  const nth = Math.min(req.afterDose ?? req.regimen.count - 1, req.regimen.count - 1);
  const target = planned.doses[nth - 1 + (req.regimen.loadingDoseMg ? 1 : 0)] as Dose;
  const doseIndex = doses.indexOf(target);
  let s;
  try {
    s = suggestSamplingTimes({
      model: c.structure,
      parameters,
      estimated,
      covarianceEta,
      residualError: c.prior.residualError,
      doses,
      doseIndex,
      options: { distributionPhaseHours: c.ctx.course.drug === 'vancomycin' ? 1 : 0.5 },
    });
  } catch (error) {
    engineRefused(error);
  }
  const design = (d: DesignValue) => ({
    draws: d.draws.map((x) => ({
      hour: x.time,
      at: atOf(c.referenceAt, x.time),
      hoursAfterDoseStart: x.hoursAfterDoseStart,
      hoursAfterInfusionEnd: x.hoursAfterInfusionEnd,
      predictedMgL: x.predicted,
    })),
    sdLogAuc24: d.sdLogAuc24,
    reduction: d.reduction,
  });
  return {
    model: modelRef(c),
    warnings: uniqueWarnings([...c.warnings, ...warnings, ...s.warnings]),
    caution: CAUTION,
    currentSdLogAuc24: s.currentSdLogAuc24,
    conventional: design(s.conventional),
    bestSingle: design(s.bestSingle),
    bestPair: design(s.bestPair),
    alternatives: s.alternatives.map(design),
    valueOfSecondLevel: s.valueOfSecondLevel,
  };
}
