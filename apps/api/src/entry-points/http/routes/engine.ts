import { Router } from 'express';
import type PgBoss from 'pg-boss';
import {
  fitRequestSchema,
  idParamsSchema,
  ptaRequestSchema,
  regimenSearchRequestSchema,
  samplingRequestSchema,
  simulateRequestSchema,
} from '@ebbtide/contracts';
import type { AppDeps } from '../../../app';
import {
  fitCourse,
  levelValidity,
  searchRegimens,
  simulateCourse,
  suggestSampling,
} from '../../../domain/engine/engine';
import { getJob, requestPta } from '../../../domain/jobs/pta';
import { ptaQueue } from '../../../jobs/pta-queue';
import { TEACHING, defineRoute, requireActor } from '../access';
import { parseRequest } from '../middlewares/validate';

/**
 * Engine endpoints: the server reads the course from the database and recomputes everything.
 * Pharmacist, reviewer and trainee (a trainee only on teaching courses, by data-access scope);
 * running the engine writes nothing to the clinical record.
 */
export function engineRoutes(
  deps: Pick<AppDeps, 'db' | 'config' | 'logger'> & { boss?: PgBoss },
): Router {
  const { db } = deps;
  const queue = ptaQueue(deps.config, db, deps.logger, deps.boss);
  const router = Router();
  defineRoute(router, {
    method: 'post',
    path: '/courses/:id/simulate',
    allow: TEACHING,
    handler: async (req, res) => {
      const { id } = parseRequest(req, 'params', idParamsSchema);
      const body = parseRequest(req, 'body', simulateRequestSchema);
      res.json(await simulateCourse(db, requireActor(req), id, body));
    },
  });
  defineRoute(router, {
    method: 'post',
    path: '/courses/:id/fit',
    allow: TEACHING,
    handler: async (req, res) => {
      const { id } = parseRequest(req, 'params', idParamsSchema);
      const body = parseRequest(req, 'body', fitRequestSchema);
      res.json(await fitCourse(db, requireActor(req), id, body));
    },
  });
  defineRoute(router, {
    method: 'post',
    path: '/courses/:id/level-validity',
    allow: TEACHING,
    handler: async (req, res) => {
      const { id } = parseRequest(req, 'params', idParamsSchema);
      res.json(await levelValidity(db, requireActor(req), id));
    },
  });
  defineRoute(router, {
    method: 'post',
    path: '/courses/:id/regimens',
    allow: TEACHING,
    handler: async (req, res) => {
      const { id } = parseRequest(req, 'params', idParamsSchema);
      const body = parseRequest(req, 'body', regimenSearchRequestSchema);
      res.json(await searchRegimens(db, requireActor(req), id, body));
    },
  });
  defineRoute(router, {
    method: 'post',
    path: '/courses/:id/sampling',
    allow: TEACHING,
    handler: async (req, res) => {
      const { id } = parseRequest(req, 'params', idParamsSchema);
      const body = parseRequest(req, 'body', samplingRequestSchema);
      res.json(await suggestSampling(db, requireActor(req), id, body));
    },
  });
  defineRoute(router, {
    method: 'post',
    path: '/courses/:id/pta',
    allow: TEACHING,
    handler: async (req, res) => {
      const { id } = parseRequest(req, 'params', idParamsSchema);
      const body = parseRequest(req, 'body', ptaRequestSchema);
      res.status(202).json(await requestPta(db, requireActor(req), id, body, queue));
    },
  });
  defineRoute(router, {
    method: 'get',
    path: '/jobs/:id',
    allow: TEACHING,
    handler: async (req, res) => {
      const { id } = parseRequest(req, 'params', idParamsSchema);
      res.json(await getJob(db, requireActor(req), id));
    },
  });
  return router;
}
