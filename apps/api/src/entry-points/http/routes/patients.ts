import { Router } from 'express';
import {
  courseCreateSchema,
  courseListQuerySchema,
  covariateCreateSchema,
  covariateListQuerySchema,
  covariateUpdateSchema,
  idParamsSchema,
  patientCreateSchema,
  patientListQuerySchema,
  patientUpdateSchema,
} from '@ebbtide/contracts';
import { z } from 'zod';
import type { Db } from '../../../data-access/db';
import { browseCourses, createCourse } from '../../../domain/courses/courses';
import {
  browseCovariates,
  createCovariate,
  editCovariate,
  getCovariate,
  removeCovariate,
} from '../../../domain/covariates/covariates';
import { derivedValuesOf } from '../../../domain/covariates/derived';
import {
  browsePatients,
  createPatient,
  editPatient,
  getPatient,
} from '../../../domain/patients/patients';
import { CLINICAL_STAFF, TEACHING, defineRoute, requireActor } from '../access';
import { parseRequest } from '../middlewares/validate';

const versionQuery = z.object({ version: z.coerce.number().int().min(1) });

/**
 * Patients, their covariates, derived values and courses.
 * Reads: pharmacist, reviewer, trainee (a trainee only ever gets teaching patients: data-access scope).
 * Writes: pharmacist, reviewer.
 */
export function patientRoutes(db: Db): Router {
  const router = Router();
  defineRoute(router, {
    method: 'get',
    path: '/patients',
    allow: TEACHING,
    handler: async (req, res) => {
      const query = parseRequest(req, 'query', patientListQuerySchema);
      res.json(await browsePatients(db, requireActor(req), query));
    },
  });
  defineRoute(router, {
    method: 'post',
    path: '/patients',
    allow: CLINICAL_STAFF,
    handler: async (req, res) => {
      const body = parseRequest(req, 'body', patientCreateSchema);
      res.status(201).json(await createPatient(db, requireActor(req), body));
    },
  });
  defineRoute(router, {
    method: 'get',
    path: '/patients/:id',
    allow: TEACHING,
    handler: async (req, res) => {
      const { id } = parseRequest(req, 'params', idParamsSchema);
      res.json(await getPatient(db, requireActor(req), id));
    },
  });
  defineRoute(router, {
    method: 'patch',
    path: '/patients/:id',
    allow: CLINICAL_STAFF,
    handler: async (req, res) => {
      const { id } = parseRequest(req, 'params', idParamsSchema);
      const body = parseRequest(req, 'body', patientUpdateSchema);
      res.json(await editPatient(db, requireActor(req), id, body));
    },
  });
  defineRoute(router, {
    method: 'get',
    path: '/patients/:id/derived',
    allow: TEACHING,
    handler: async (req, res) => {
      const { id } = parseRequest(req, 'params', idParamsSchema);
      res.json(await derivedValuesOf(db, requireActor(req), id));
    },
  });
  defineRoute(router, {
    method: 'get',
    path: '/patients/:id/covariates',
    allow: TEACHING,
    handler: async (req, res) => {
      const { id } = parseRequest(req, 'params', idParamsSchema);
      const query = parseRequest(req, 'query', covariateListQuerySchema);
      res.json(await browseCovariates(db, requireActor(req), id, query));
    },
  });
  defineRoute(router, {
    method: 'post',
    path: '/patients/:id/covariates',
    allow: CLINICAL_STAFF,
    handler: async (req, res) => {
      const { id } = parseRequest(req, 'params', idParamsSchema);
      const body = parseRequest(req, 'body', covariateCreateSchema);
      res.status(201).json(await createCovariate(db, requireActor(req), id, body));
    },
  });
  defineRoute(router, {
    method: 'get',
    path: '/covariates/:id',
    allow: TEACHING,
    handler: async (req, res) => {
      const { id } = parseRequest(req, 'params', idParamsSchema);
      res.json(await getCovariate(db, requireActor(req), id));
    },
  });
  defineRoute(router, {
    method: 'patch',
    path: '/covariates/:id',
    allow: CLINICAL_STAFF,
    handler: async (req, res) => {
      const { id } = parseRequest(req, 'params', idParamsSchema);
      const body = parseRequest(req, 'body', covariateUpdateSchema);
      res.json(await editCovariate(db, requireActor(req), id, body));
    },
  });
  defineRoute(router, {
    method: 'delete',
    path: '/covariates/:id',
    allow: CLINICAL_STAFF,
    handler: async (req, res) => {
      const { id } = parseRequest(req, 'params', idParamsSchema);
      const { version } = parseRequest(req, 'query', versionQuery);
      await removeCovariate(db, requireActor(req), id, version);
      res.status(204).end();
    },
  });
  defineRoute(router, {
    method: 'get',
    path: '/patients/:id/courses',
    allow: TEACHING,
    handler: async (req, res) => {
      const { id } = parseRequest(req, 'params', idParamsSchema);
      const query = parseRequest(req, 'query', courseListQuerySchema);
      const actor = requireActor(req);
      await getPatient(db, actor, id);
      res.json(await browseCourses(db, actor, { ...query, patientId: id }));
    },
  });
  defineRoute(router, {
    method: 'post',
    path: '/patients/:id/courses',
    allow: CLINICAL_STAFF,
    handler: async (req, res) => {
      const { id } = parseRequest(req, 'params', idParamsSchema);
      const body = parseRequest(req, 'body', courseCreateSchema);
      res.status(201).json(await createCourse(db, requireActor(req), id, body));
    },
  });
  return router;
}
