import { Router } from 'express';
import { reviewQueueQuerySchema } from '@ebbtide/contracts';
import type { AppDeps } from '../../../app';
import { reviewQueue } from '../../../domain/reviews/queue';
import { REVIEWERS, defineRoute, requireActor } from '../access';
import { parseRequest } from '../middlewares/validate';

/** GET /api/reviews — the reviewers' queue of submitted plans, oldest first. */
export function reviewRoutes(deps: AppDeps): Router {
  const router = Router();
  defineRoute(router, {
    method: 'get',
    path: '/reviews',
    allow: REVIEWERS,
    handler: async (req, res) => {
      const query = parseRequest(req, 'query', reviewQueueQuerySchema);
      res.json(await reviewQueue(deps.db, requireActor(req), query));
    },
  });
  return router;
}
