import { Router } from 'express';
import { auditQuerySchema } from '@ebbtide/contracts';
import type { AppDeps } from '../../../app';
import { browseAudit } from '../../../domain/audit/browse-audit';
import { ADMINS, defineRoute } from '../access';
import { parseRequest } from '../middlewares/validate';

/** GET /api/audit — the append-only audit trail (admins only). */
export function auditRoutes(deps: AppDeps): Router {
  const router = Router();
  defineRoute(router, {
    method: 'get',
    path: '/audit',
    allow: ADMINS,
    handler: async (req, res) => {
      const query = parseRequest(req, 'query', auditQuerySchema);
      res.json(await browseAudit(deps.db, query));
    },
  });
  return router;
}
