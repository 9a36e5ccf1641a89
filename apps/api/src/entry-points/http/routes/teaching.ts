import { Router } from 'express';
import {
  anonymisedCopySchema,
  practicePlanCreateSchema,
  teachingCaseParamsSchema,
} from '@ebbtide/contracts';
import type { AppDeps } from '../../../app';
import {
  anonymisingCopy,
  browseTeachingCases,
  getTeachingCase,
  listPracticePlans,
  submitPracticePlan,
  teachingSources,
} from '../../../domain/teaching/teaching';
import { ADMINS, TEACHING, defineRoute, requireActor } from '../access';
import { parseRequest } from '../middlewares/validate';

/**
 * Teaching cases: the list and a case in relative time (trainees and the pharmacists who teach
 * them), practice plans scored against the hidden true patient, and the admin's anonymising copy.
 */
export function teachingRoutes(deps: AppDeps): Router {
  const router = Router();
  const timeZone =
    (deps.config as AppDeps['config'] & { hospitalTimeZone?: string }).hospitalTimeZone ??
    'Australia/Brisbane';

  defineRoute(router, {
    method: 'get',
    path: '/teaching/cases',
    allow: TEACHING,
    handler: async (req, res) => {
      res.json({ items: await browseTeachingCases(deps.db, requireActor(req)) });
    },
  });

  defineRoute(router, {
    method: 'get',
    path: '/teaching/cases/:id',
    allow: TEACHING,
    handler: async (req, res) => {
      const { id } = parseRequest(req, 'params', teachingCaseParamsSchema);
      res.json(await getTeachingCase(deps.db, requireActor(req), id));
    },
  });

  defineRoute(router, {
    method: 'get',
    path: '/teaching/cases/:id/practice-plans',
    allow: TEACHING,
    handler: async (req, res) => {
      const { id } = parseRequest(req, 'params', teachingCaseParamsSchema);
      res.json({ items: await listPracticePlans(deps.db, requireActor(req), id) });
    },
  });

  defineRoute(router, {
    method: 'post',
    path: '/teaching/cases/:id/practice-plans',
    allow: TEACHING,
    handler: async (req, res) => {
      const { id } = parseRequest(req, 'params', teachingCaseParamsSchema);
      const body = parseRequest(req, 'body', practicePlanCreateSchema);
      res.status(201).json(await submitPracticePlan(deps.db, requireActor(req), id, body));
    },
  });

  defineRoute(router, {
    method: 'get',
    path: '/teaching/sources',
    allow: ADMINS,
    handler: async (_req, res) => {
      res.json(await teachingSources(deps.db));
    },
  });

  defineRoute(router, {
    method: 'post',
    path: '/teaching/cases',
    allow: ADMINS,
    handler: async (req, res) => {
      const body = parseRequest(req, 'body', anonymisedCopySchema);
      res.status(201).json(await anonymisingCopy(deps.db, requireActor(req), body, timeZone));
    },
  });

  return router;
}
