import { Router } from 'express';
import { caseloadQuerySchema } from '@ebbtide/contracts';
import type { Db } from '../../../data-access/db';
import { caseloadOf } from '../../../domain/caseload/caseload';
import { TEACHING, defineRoute, requireActor } from '../access';
import { parseRequest } from '../middlewares/validate';

/** The signed-in user's caseload (a trainee only ever sees teaching courses, by data-access scope). */
export function caseloadRoutes(db: Db): Router {
  const router = Router();
  defineRoute(router, {
    method: 'get',
    path: '/caseload',
    allow: TEACHING,
    handler: async (req, res) => {
      const query = parseRequest(req, 'query', caseloadQuerySchema);
      res.json(await caseloadOf(db, requireActor(req), query));
    },
  });
  return router;
}
