import { Router } from 'express';
import {
  courseListQuerySchema,
  courseUpdateSchema,
  doseCreateSchema,
  doseListQuerySchema,
  doseUpdateSchema,
  idParamsSchema,
  levelCreateSchema,
  levelListQuerySchema,
  levelUpdateSchema,
} from '@ebbtide/contracts';
import { z } from 'zod';
import type { Db } from '../../../data-access/db';
import { browseCourses, editCourse, getCourse } from '../../../domain/courses/courses';
import {
  browseDoses,
  createDose,
  editDose,
  getDose,
  removeDose,
} from '../../../domain/doses/doses';
import {
  browseLevels,
  createLevel,
  editLevel,
  getLevel,
  removeLevel,
} from '../../../domain/levels/levels';
import { CLINICAL_STAFF, TEACHING, defineRoute, requireActor } from '../access';
import { parseRequest } from '../middlewares/validate';

const versionQuery = z.object({ version: z.coerce.number().int().min(1) });

/**
 * Courses, their doses and levels. Reads: pharmacist, reviewer, trainee (teaching only, by scope);
 * writes: pharmacist, reviewer.
 */
export function courseRoutes(db: Db): Router {
  const router = Router();
  defineRoute(router, {
    method: 'get',
    path: '/courses',
    allow: TEACHING,
    handler: async (req, res) => {
      const query = parseRequest(req, 'query', courseListQuerySchema);
      res.json(await browseCourses(db, requireActor(req), query));
    },
  });
  defineRoute(router, {
    method: 'get',
    path: '/courses/:id',
    allow: TEACHING,
    handler: async (req, res) => {
      const { id } = parseRequest(req, 'params', idParamsSchema);
      res.json(await getCourse(db, requireActor(req), id));
    },
  });
  defineRoute(router, {
    method: 'patch',
    path: '/courses/:id',
    allow: CLINICAL_STAFF,
    handler: async (req, res) => {
      const { id } = parseRequest(req, 'params', idParamsSchema);
      const body = parseRequest(req, 'body', courseUpdateSchema);
      res.json(await editCourse(db, requireActor(req), id, body));
    },
  });

  defineRoute(router, {
    method: 'get',
    path: '/courses/:id/doses',
    allow: TEACHING,
    handler: async (req, res) => {
      const { id } = parseRequest(req, 'params', idParamsSchema);
      const query = parseRequest(req, 'query', doseListQuerySchema);
      res.json(await browseDoses(db, requireActor(req), id, query));
    },
  });
  defineRoute(router, {
    method: 'post',
    path: '/courses/:id/doses',
    allow: CLINICAL_STAFF,
    handler: async (req, res) => {
      const { id } = parseRequest(req, 'params', idParamsSchema);
      const body = parseRequest(req, 'body', doseCreateSchema);
      res.status(201).json(await createDose(db, requireActor(req), id, body));
    },
  });
  defineRoute(router, {
    method: 'get',
    path: '/doses/:id',
    allow: TEACHING,
    handler: async (req, res) => {
      const { id } = parseRequest(req, 'params', idParamsSchema);
      res.json(await getDose(db, requireActor(req), id));
    },
  });
  defineRoute(router, {
    method: 'patch',
    path: '/doses/:id',
    allow: CLINICAL_STAFF,
    handler: async (req, res) => {
      const { id } = parseRequest(req, 'params', idParamsSchema);
      const body = parseRequest(req, 'body', doseUpdateSchema);
      res.json(await editDose(db, requireActor(req), id, body));
    },
  });
  defineRoute(router, {
    method: 'delete',
    path: '/doses/:id',
    allow: CLINICAL_STAFF,
    handler: async (req, res) => {
      const { id } = parseRequest(req, 'params', idParamsSchema);
      const { version } = parseRequest(req, 'query', versionQuery);
      await removeDose(db, requireActor(req), id, version);
      res.status(204).end();
    },
  });

  defineRoute(router, {
    method: 'get',
    path: '/courses/:id/levels',
    allow: TEACHING,
    handler: async (req, res) => {
      const { id } = parseRequest(req, 'params', idParamsSchema);
      const query = parseRequest(req, 'query', levelListQuerySchema);
      res.json(await browseLevels(db, requireActor(req), id, query));
    },
  });
  defineRoute(router, {
    method: 'post',
    path: '/courses/:id/levels',
    allow: CLINICAL_STAFF,
    handler: async (req, res) => {
      const { id } = parseRequest(req, 'params', idParamsSchema);
      const body = parseRequest(req, 'body', levelCreateSchema);
      res.status(201).json(await createLevel(db, requireActor(req), id, body));
    },
  });
  defineRoute(router, {
    method: 'get',
    path: '/levels/:id',
    allow: TEACHING,
    handler: async (req, res) => {
      const { id } = parseRequest(req, 'params', idParamsSchema);
      res.json(await getLevel(db, requireActor(req), id));
    },
  });
  defineRoute(router, {
    method: 'patch',
    path: '/levels/:id',
    allow: CLINICAL_STAFF,
    handler: async (req, res) => {
      const { id } = parseRequest(req, 'params', idParamsSchema);
      const body = parseRequest(req, 'body', levelUpdateSchema);
      res.json(await editLevel(db, requireActor(req), id, body));
    },
  });
  defineRoute(router, {
    method: 'delete',
    path: '/levels/:id',
    allow: CLINICAL_STAFF,
    handler: async (req, res) => {
      const { id } = parseRequest(req, 'params', idParamsSchema);
      const { version } = parseRequest(req, 'query', versionQuery);
      await removeLevel(db, requireActor(req), id, version);
      res.status(204).end();
    },
  });
  return router;
}
