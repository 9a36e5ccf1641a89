import {
  fitMap,
  populationPriorFromLibrary,
  simulate,
  type Dose,
  type DrugModelEntry,
  type MeasuredLevel,
  type ModelStructure,
  type PkParameters,
} from '@ebbtide/kinetics';
import type { FitRequest, FitResponse, Regimen, Warning } from '@ebbtide/contracts';
import type { Conn } from '../../data-access/casework-db';
import { covariatesOfPatient } from '../../data-access/covariates-repo';
import { dosesOfCourse, type DoseRecord } from '../../data-access/doses-repo';
import { levelsOfCourse, type LevelRecord } from '../../data-access/levels-repo';
import { AppError } from '../../lib/app-error';
import { requireCourse, type CourseContext } from '../courses/courses';
import { computeDerived } from '../covariates/derived';
import type { CaseworkActor } from '../patients/common';
import { plannedRegimenDoses } from '../engine/engine';
import { CLINICAL_CAUTION } from './caution';

const HOUR_MS = 3_600_000;

/**
 * Engine inputs read from a course's stored rows, a MAP fit and a forward simulation over
 * @ebbtide/kinetics, for the teaching practice plans (domain/teaching). Plans do not use this
 * file: they call the casework engine use cases (domain/engine, see plan-deps.ts), so a plan shows
 * the numbers of the regimen screen.
 */
export interface EngineInputs {
  ctx: CourseContext;
  entry: DrugModelEntry;
  structure: ModelStructure;
  /** Real courses: the instant of hour 0; teaching courses: null (hours are stored). */
  originAt: string | null;
  doses: Dose[];
  doseRecords: DoseRecord[];
  levels: Array<MeasuredLevel & { id: string }>;
  levelRecords: LevelRecord[];
  covariateValues: Record<string, number>;
  warnings: Warning[];
}

const unprocessable = (message: string) => new AppError('engine-input', message, 422);

export async function engineInputs(
  conn: Conn,
  actor: CaseworkActor,
  courseId: string,
): Promise<EngineInputs> {
  const ctx = await requireCourse(conn, actor, courseId);
  const entry = ctx.model.definition as unknown as DrugModelEntry;
  if (!entry?.structure) throw unprocessable('The drug model has no structure the engine can use');
  // One after another: `conn` may be a transaction, whose single client runs one query at a time.
  const doseRecords = await dosesOfCourse(conn, courseId);
  const levelRecords = await levelsOfCourse(conn, courseId);
  const covariates = await covariatesOfPatient(conn, ctx.patient.id);
  const given = doseRecords.filter((d) => d.administrationStatus !== 'missed');
  const startTimes = given
    .map((d) => d.startAt)
    .filter((t): t is string => t !== null)
    .sort();
  const originAt = ctx.course.isTeaching ? null : (startTimes[0] ?? null);
  const hourOf = (at: string | null, hour: number | null): number =>
    at !== null && originAt !== null
      ? (Date.parse(at) - Date.parse(originAt)) / HOUR_MS
      : (hour ?? 0);
  const doses: Dose[] = given.map((d) => ({
    time: hourOf(d.startAt, d.startHour),
    amount: d.amountMg,
    route: d.route === 'iv-infusion' ? 'infusion' : d.route === 'iv-bolus' ? 'bolus' : 'oral',
    ...(d.route === 'iv-infusion' ? { duration: d.durationH ?? 1 } : {}),
  }));
  const levels = levelRecords
    .filter((l) => l.fraction === 'total')
    .map((l) => ({
      id: l.id,
      time: hourOf(l.collectedAt, l.collectedHour),
      value: l.valueMgL,
      ...(l.assayLowerLimit !== null ? { lloq: l.assayLowerLimit } : {}),
      ...(['trough', 'peak', 'random'].includes(l.sampleKind)
        ? { kind: l.sampleKind as 'trough' | 'peak' | 'random' }
        : {}),
    }));
  const derived = computeDerived(ctx.patient, covariates);
  const warnings: Warning[] = [...derived.warnings];
  const values: Record<string, number> = {};
  for (const c of entry.covariates ?? []) {
    if (c.name === 'WT' && derived.inputs.weightKg !== null) values.WT = derived.inputs.weightKg;
    if (c.name === 'CRCL' && derived.creatinineClearance) {
      values.CRCL = derived.creatinineClearance.value;
    }
    if (c.name === 'HD') {
      values.HD = derived.inputs.dialysisStatus === 'intermittent-haemodialysis' ? 1 : 0;
    }
    if (values[c.name] === undefined) {
      throw unprocessable(
        `The model needs ${c.name} (${c.unit}); record the covariates it is computed from first`,
      );
    }
  }
  return {
    ctx,
    entry,
    structure: entry.structure as ModelStructure,
    originAt,
    doses,
    doseRecords,
    levels,
    levelRecords,
    covariateValues: values,
    warnings,
  };
}

function prior(inputs: EngineInputs) {
  try {
    return populationPriorFromLibrary(inputs.entry, inputs.covariateValues);
  } catch (error) {
    throw unprocessable(error instanceof Error ? error.message : String(error));
  }
}

export function fitFrom(inputs: EngineInputs, request: FitRequest): FitResponse {
  const { prior: p, warnings: priorWarnings } = prior(inputs);
  const excluded = new Set(request.excludeLevelIds ?? []);
  const levels = inputs.levels.filter((l) => !excluded.has(l.id));
  const base = {
    model: { id: inputs.ctx.model.id, version: inputs.ctx.model.version },
    caution: CLINICAL_CAUTION,
    populationParameters: p.typical,
  };
  if (request.method === 'population' || levels.length === 0) {
    if (request.method !== 'population') throw unprocessable('There are no levels to fit');
    return {
      ...base,
      method: 'population',
      warnings: [...inputs.warnings, ...priorWarnings],
      parameters: p.typical,
      uncertainty: null,
      shrinkage: null,
      predictions: [],
      levelsUsed: 0,
    };
  }
  if (request.method === 'two-level') {
    throw unprocessable('The two-level method is offered on the fit screen, not for plans');
  }
  const result = fitMap({
    model: inputs.structure,
    prior: p,
    doses: inputs.doses,
    levels: levels.map(({ id: _id, ...l }) => l),
    priorWarnings: [...priorWarnings],
  });
  const uncertainty = result.intervals90
    ? Object.fromEntries(
        Object.entries(result.intervals90).map(([k, [low, high]]) => [k, { low, high }]),
      )
    : null;
  return {
    ...base,
    method: 'map',
    warnings: [
      ...inputs.warnings,
      ...result.warnings.map((w) => ({ code: w.code, message: w.message })),
      ...(result.outcome === 'converged'
        ? []
        : [{ code: 'fit-not-converged', message: 'The Bayesian fit did not converge' }]),
    ],
    parameters: result.parameters as unknown as Record<string, number>,
    uncertainty,
    shrinkage: result.shrinkage ?? null,
    predictions: levels.map((l, i) => {
      const f = result.levels[i];
      return {
        levelId: l.id,
        hour: l.time,
        observedMgL: l.value,
        predictedMgL: f?.individual ?? null,
        populationPredictedMgL: f?.population ?? null,
        residualMgL: f?.residual ?? null,
      };
    }),
    levelsUsed: levels.length,
  };
}

/** The regimen's doses as engine doses (hour 0 = the course's first dose). */
export function regimenDoses(inputs: EngineInputs, regimen: Regimen): Dose[] {
  const lastHour = inputs.doses.reduce((m, d) => Math.max(m, d.time), -Infinity);
  const start =
    regimen.startAt && inputs.originAt
      ? (Date.parse(regimen.startAt) - Date.parse(inputs.originAt)) / HOUR_MS
      : (regimen.startHour ?? (Number.isFinite(lastHour) ? lastHour + regimen.intervalH : 0));
  return plannedRegimenDoses(inputs.entry, inputs.ctx.course.drug, regimen, start);
}

/**
 * Exposure of a dosing history with given parameters over the last interval of `regimen`:
 * peak and trough in that interval, AUC24 = AUC over the interval × 24 / interval.
 */
export function exposureOver(
  structure: ModelStructure,
  parameters: PkParameters,
  doses: Dose[],
  window: { from: number; to: number },
  stepH = 0.25,
) {
  const times: number[] = [];
  const first = Math.min(0, ...doses.map((d) => d.time));
  for (let t = first; t <= window.to + 1e-9; t += stepH) times.push(Number(t.toFixed(6)));
  if (times.at(-1)! < window.to) times.push(window.to);
  const r = simulate({
    model: structure,
    parameters,
    doses,
    outputTimes: times,
    aucWindows: [[window.from, window.to]],
  });
  const inWindow = r.times
    .map((t, i) => ({ t, c: r.concentrations[i]! }))
    .filter((p) => p.t >= window.from - 1e-9 && p.t <= window.to + 1e-9);
  const span = window.to - window.from;
  return {
    points: r.times.map((t, i) => ({ hour: t, c: r.concentrations[i]! })),
    exposure: {
      peakMgL: inWindow.length ? Math.max(...inWindow.map((p) => p.c)) : null,
      troughMgL: inWindow.length ? inWindow.at(-1)!.c : null,
      auc24: span > 0 ? (r.aucs[0]! * 24) / span : null,
    },
    errorEstimate: r.errorEstimate,
  };
}
