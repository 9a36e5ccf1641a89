import type { Job, JobAccepted, PtaRequest, PtaResult, Warning } from '@ebbtide/contracts';
import {
  mergePtaResults,
  probabilityOfTargetAttainment,
  ptaChunks,
  type PtaInput,
  type PtaResult as EnginePta,
} from '@ebbtide/kinetics';
import type { Conn } from '../../data-access/casework-db';
import {
  findEngineJob,
  insertEngineJob,
  updateEngineJob,
  type EngineJobRecord,
} from '../../data-access/engine-jobs-repo';
import { AppError, notFound } from '../../lib/app-error';
import { requireCourse } from '../courses/courses';
import { CAUTION, engineRefused, loadEngineCase } from '../engine/context';
import { exposureTarget, fitMapFor } from '../engine/engine';
import type { CaseworkActor } from '../patients/common';

export const PTA_QUEUE = 'engine-pta';
/** The run is split into this many slices; progress is saved after each. */
export const PTA_PROGRESS_SLICES = 20;
/** From this many virtual patients a run goes to the worker-thread pool when one is available. */
export const POOL_MIN_SAMPLES = 5000;

/** What the job needs of a PTA worker pool. */
export interface PtaRunner {
  run(input: PtaInput): Promise<EnginePta>;
}

export interface JobQueue {
  send(queue: string, data: Record<string, unknown>): Promise<void>;
}

export function toJobDto(j: EngineJobRecord): Job {
  return {
    id: j.id,
    kind: j.kind,
    state: j.state,
    progress: j.progress,
    result: j.result ?? null,
    error: j.error,
    createdAt: j.createdAt,
    updatedAt: j.updatedAt,
  };
}

/** Accepts a PTA run: checks the course can be computed, stores the job, queues it (202). */
export async function requestPta(
  db: Conn,
  actor: CaseworkActor,
  courseId: string,
  req: PtaRequest,
  queue: JobQueue,
): Promise<JobAccepted> {
  // Loading the case checks now that the engine can run (covariates present), before the job is queued.
  await loadEngineCase(db, actor, courseId);
  const job = await insertEngineJob(db, {
    kind: 'pta',
    courseId,
    requestedBy: actor.userId,
    request: { ...req, actorRole: actor.role },
  });
  await queue.send(PTA_QUEUE, { jobId: job.id });
  return { jobId: job.id, statusUrl: `/api/jobs/${job.id}` };
}

export async function getJob(db: Conn, actor: CaseworkActor, id: string): Promise<Job> {
  const job = await findEngineJob(db, id);
  if (!job) throw notFound('Job');
  await requireCourse(db, actor, job.courseId).catch(() => {
    throw notFound('Job');
  });
  return toJobDto(job);
}

/** Runs one queued PTA job (called by the queue worker), saving progress after each slice. */
export async function runPtaJob(
  db: Conn,
  jobId: string,
  options: {
    /** Worker-thread pool for large runs (from @ebbtide/kinetics/node); same answer as the pure core. */
    pool?: PtaRunner;
    yieldToLoop?: () => Promise<void>;
  } = {},
): Promise<void> {
  const yieldToLoop = options.yieldToLoop ?? (() => new Promise<void>((r) => setImmediate(r)));
  const job = await findEngineJob(db, jobId);
  if (!job || job.state !== 'queued') return;
  await updateEngineJob(db, jobId, { state: 'running', progress: 0 });
  try {
    const req = job.request as unknown as PtaRequest & { actorRole: CaseworkActor['role'] };
    // Access was checked when the job was accepted; the worker reads the course as its requester's role.
    const actor: CaseworkActor = {
      userId: job.requestedBy ?? '',
      subject: 'engine-worker',
      displayName: 'engine worker',
      role: req.actorRole,
    };
    const c = await loadEngineCase(db, actor, job.courseId);
    const warnings: Warning[] = [...c.warnings];
    let source: PtaInput['source'];
    if (req.parameters === 'map' && c.levels.length > 0) {
      const fit = fitMapFor(c);
      if (!fit.covarianceEta)
        throw new AppError(
          'engine-refused',
          'The fit gave no posterior covariance: run PTA on population parameters instead.',
          422,
        );
      source = {
        kind: 'posterior',
        parameters: fit.parameters as unknown as Record<string, number>,
        estimated: fit.estimated,
        covarianceEta: fit.covarianceEta,
      };
      warnings.push(...fit.warnings);
    } else {
      if (req.parameters === 'map')
        warnings.push({
          code: 'no-levels',
          message: 'No levels yet: virtual patients come from the population prior.',
        });
      source = { kind: 'population', prior: c.prior };
    }
    const target = req.target ?? c.ctx.course.target;
    const input: PtaInput = {
      model: c.structure,
      source,
      regimens: [
        {
          amount: req.regimen.doseMg,
          interval: req.regimen.intervalH,
          infusionDuration: req.regimen.route === 'iv-bolus' ? 0 : req.regimen.infusionH,
          regimenKind:
            req.regimen.route === 'oral'
              ? 'oral'
              : req.regimen.route === 'im'
                ? 'intramuscular'
                : 'intermittent-infusion',
          saltFactor: c.entry.practical?.saltFactor ?? 1,
        },
      ],
      target: exposureTarget(
        target,
        c.ctx.course.micMgL,
        warnings,
        c.structure.elimination === 'michaelis-menten',
      ),
      n: req.samples,
      seed: req.seed ?? 20261202,
      peakDelay: c.ctx.course.drug === 'vancomycin' ? 1 : 0.5,
    };
    let merged: EnginePta;
    if (options.pool && req.samples >= POOL_MIN_SAMPLES) {
      // Large runs go to worker threads (the event loop stays free); progress moves in one step.
      await updateEngineJob(db, jobId, { progress: 0.01 });
      try {
        merged = await options.pool.run(input);
      } catch (error) {
        engineRefused(error);
      }
    } else {
      const parts: EnginePta[] = [];
      const slices = ptaChunks(req.samples, Math.min(PTA_PROGRESS_SLICES, req.samples));
      for (const [i, range] of slices.entries()) {
        try {
          parts.push(probabilityOfTargetAttainment({ ...input, range }));
        } catch (error) {
          engineRefused(error);
        }
        await updateEngineJob(db, jobId, { progress: (i + 1) / slices.length });
        await yieldToLoop();
      }
      merged = mergePtaResults(parts);
    }
    const r = merged.regimens[0];
    if (!r) throw new Error('PTA returned no regimen');
    const result: PtaResult = {
      model: { id: c.ctx.model.id, version: c.ctx.model.version },
      warnings,
      caution: CAUTION,
      target,
      samples: merged.n,
      probability: r.probability,
      percentiles: {},
      standardError: r.standardError,
      perTarget: r.perTarget,
      regimen: {
        doseMg: req.regimen.doseMg,
        intervalH: req.regimen.intervalH,
        infusionH: req.regimen.infusionH,
      },
      source: source.kind,
    };
    await updateEngineJob(db, jobId, { state: 'completed', progress: 1, result });
  } catch (error) {
    const message = error instanceof Error ? error.message : String(error);
    await updateEngineJob(db, jobId, { state: 'failed', error: message });
  }
}
