import { Router } from 'express';
import { z } from 'zod';
import { roleSchema } from '@ebbtide/contracts';
import type { Db } from '../../../data-access/db';
import { listUsers } from '../../../data-access/users';
import { changeUserRole } from '../../../domain/users/change-role';
import { ADMINS, defineRoute, requireActor } from '../access';
import { parseRequest } from '../middlewares/validate';

const idParams = z.object({ id: z.string().uuid('must be a user id') });
const roleBody = z.object({ role: roleSchema }).strict();

/** Admin: list users and change a user's role. */
export function userRoutes(db: Db): Router {
  const router = Router();
  defineRoute(router, {
    method: 'get',
    path: '/users',
    allow: ADMINS,
    handler: async (_req, res) => {
      res.json({ users: await listUsers(db) });
    },
  });
  defineRoute(router, {
    method: 'patch',
    path: '/users/:id/role',
    allow: ADMINS,
    handler: async (req, res) => {
      const actor = requireActor(req);
      const { id } = parseRequest(req, 'params', idParams);
      const { role } = parseRequest(req, 'body', roleBody);
      res.json({ user: await changeUserRole(db, actor, id, role) });
    },
  });
  return router;
}
