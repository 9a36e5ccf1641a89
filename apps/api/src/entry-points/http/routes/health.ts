import { Router } from 'express';
import { z } from 'zod';
import { isDatabaseReachable, type Db } from '../../../data-access/db';
import { getHealth } from '../../../domain/health/get-health';
import { apiVersion } from '../../../lib/version';
import { defineRoute } from '../access';
import { parseRequest } from '../middlewares/validate';

const healthQuery = z
  .object({ timeoutMs: z.coerce.number().int().min(50).max(10_000).optional() })
  .strict();

export function healthRoutes(db: Db): Router {
  const router = Router();
  defineRoute(router, {
    method: 'get',
    path: '/health',
    allow: 'public',
    handler: async (req, res) => {
      const { timeoutMs } = parseRequest(req, 'query', healthQuery);
      const report = await getHealth({
        version: apiVersion,
        isDatabaseReachable: () => isDatabaseReachable(db, timeoutMs),
      });
      res.status(report.status === 'ok' ? 200 : 503).json(report);
    },
  });
  return router;
}
