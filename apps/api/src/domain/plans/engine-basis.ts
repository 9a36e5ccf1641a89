import type {
  FitRequest,
  FitResponse,
  PlanBasis,
  Regimen,
  SimulateRequest,
  SimulateResponse,
  Target,
  Warning,
} from '@ebbtide/contracts';
import type { Conn } from '../../data-access/casework-db';
import { covariatesOfPatient } from '../../data-access/covariates-repo';
import { dosesOfCourse } from '../../data-access/doses-repo';
import { levelsOfCourse } from '../../data-access/levels-repo';
import { AppError } from '../../lib/app-error';
import type { CourseContext } from '../courses/courses';
import type { CaseworkActor } from '../patients/common';

/**
 * The casework engine use cases a plan rests on (POST /api/courses/:id/fit and /simulate in
 * contracts/engine.ts). The plan domain never computes kinetics itself: it asks the same
 * functions the fit and regimen screens use, on the server, from the stored rows.
 */
export interface CourseEngine {
  fit(
    conn: Conn,
    actor: CaseworkActor,
    courseId: string,
    request: FitRequest,
  ): Promise<FitResponse>;
  simulate(
    conn: Conn,
    actor: CaseworkActor,
    courseId: string,
    request: SimulateRequest,
  ): Promise<SimulateResponse>;
}

/**
 * The stored basis: the contract's fields plus the fit's 90% parameter intervals (absent on plans
 * stored before they were recorded), from which the report draws its uncertainty band.
 */
export type PlanEngineBasis = PlanBasis & {
  uncertainty?: Record<string, { low: number; high: number }> | null;
};

export const engineUnavailable = (cause?: unknown) =>
  new AppError(
    'engine-unavailable',
    'The dosing engine could not compute this plan on the server; nothing was changed',
    503,
    {},
    { cause },
  );

/** Whether an exposure meets a target on the target's metric; null when the metric is missing. */
export function meetsTarget(
  target: Target,
  exposure: PlanBasis['predicted'],
  micMgL: number | null,
): boolean | null {
  const value =
    target.metric === 'auc24'
      ? exposure.auc24
      : target.metric === 'trough'
        ? exposure.troughMgL
        : target.metric === 'peak'
          ? exposure.peakMgL
          : target.metric === 'peak-mic-ratio'
            ? exposure.peakMgL !== null && micMgL
              ? exposure.peakMgL / micMgL
              : null
            : exposure.auc24 !== null
              ? exposure.auc24 / 24
              : null;
  if (value === null) return null;
  return (
    (target.low === null || value >= target.low) && (target.high === null || value <= target.high)
  );
}

function thin<T>(points: T[], max: number): T[] {
  if (points.length <= max) return points;
  const step = (points.length - 1) / (max - 1);
  return Array.from({ length: max }, (_, i) => points[Math.round(i * step)]!);
}

/**
 * Recomputes the engine inputs and outputs of a regimen for a course, from the database:
 * a Bayesian MAP fit when levels allow it (else the population prior), then the regimen simulated
 * forward with those parameters. Records exactly which rows (id and version) went in.
 */
export async function computeBasis(
  conn: Conn,
  actor: CaseworkActor,
  ctx: CourseContext,
  regimen: Regimen & { startAt: string },
  engine: CourseEngine,
  now = new Date(),
): Promise<PlanEngineBasis> {
  // One after another: `conn` is the plan's transaction, whose single client runs one query at a time.
  const doses = await dosesOfCourse(conn, ctx.course.id);
  const levels = await levelsOfCourse(conn, ctx.course.id);
  const covariates = await covariatesOfPatient(conn, ctx.patient.id);
  const warnings: Warning[] = [];
  let fit: FitResponse | null = null;
  let method = 'population';
  try {
    if (levels.length > 0) {
      fit = await engine.fit(conn, actor, ctx.course.id, { method: 'map', excludeLevelIds: [] });
      method = 'map';
    }
  } catch (error) {
    if (!(error instanceof AppError) || error.httpStatus >= 500) throw engineUnavailable(error);
    warnings.push({
      code: 'fit-not-possible',
      message: `No Bayesian fit (${error.message}); the population prior was used`,
    });
  }
  let sim: SimulateResponse;
  try {
    sim = await engine.simulate(conn, actor, ctx.course.id, {
      parameters: method === 'map' ? 'map' : 'population',
      regimen,
      horizonH: 24,
      stepH: 0.25,
    });
  } catch (error) {
    if (error instanceof AppError && error.httpStatus < 500) throw error;
    throw engineUnavailable(error);
  }
  const usedLevelIds = new Set(fit?.predictions.map((p) => p.levelId) ?? []);
  const allWarnings = [...(fit?.warnings ?? []), ...sim.warnings, ...warnings].filter(
    (w, i, arr) => arr.findIndex((x) => x.code === w.code && x.message === w.message) === i,
  );
  return {
    computedAt: now.toISOString(),
    method,
    model: { id: ctx.model.id, version: ctx.model.version, name: ctx.model.name },
    parameters: sim.parameters,
    populationParameters: fit?.populationParameters ?? null,
    uncertainty: method === 'map' ? (fit?.uncertainty ?? null) : null,
    doses: doses.map((d) => ({
      id: d.id,
      version: d.version,
      startAt: d.startAt,
      amountMg: d.amountMg,
      route: d.route,
      durationH: d.durationH,
      status: d.administrationStatus,
    })),
    levels: levels.map((l) => ({
      id: l.id,
      version: l.version,
      collectedAt: l.collectedAt,
      valueMgL: l.valueMgL,
      sampleKind: l.sampleKind,
      used: method === 'map' && usedLevelIds.has(l.id),
    })),
    covariates: covariates.map((c) => ({
      id: c.id,
      kind: c.kind,
      canonicalValue: c.canonicalValue,
      observedAt: c.observedAt,
      detail: c.weightSource ?? c.dialysisStatus ?? null,
    })),
    predicted: sim.exposure,
    profile: thin(sim.points, 240),
    meetsTarget: meetsTarget(ctx.course.target, sim.exposure, ctx.course.micMgL),
    warnings: allWarnings,
  };
}
