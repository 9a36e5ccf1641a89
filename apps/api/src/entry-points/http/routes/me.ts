import { Router } from 'express';
import { defineRoute, requireActor } from '../access';

export interface MeBody {
  id: string;
  subject: string;
  displayName: string;
  email: string | null;
  role: string;
}

/**
 * GET /api/me: the signed-in user and role (401 when signed out).
 * GET /api/session: the same, or `{ user: null }`, for the client to learn whether anyone is
 * signed in without provoking an error (public).
 */
export function meRoutes(): Router {
  const router = Router();
  defineRoute(router, {
    method: 'get',
    path: '/me',
    allow: 'signed-in',
    handler: (req, res) => {
      const actor = requireActor(req);
      res.json({
        id: actor.userId,
        subject: actor.subject,
        displayName: actor.displayName,
        email: actor.email,
        role: actor.role,
      } satisfies MeBody);
    },
  });
  defineRoute(router, {
    method: 'get',
    path: '/session',
    allow: 'public',
    handler: (req, res) => {
      const a = req.actor;
      res.json({
        user: a
          ? {
              id: a.userId,
              subject: a.subject,
              displayName: a.displayName,
              email: a.email,
              role: a.role,
            }
          : null,
      });
    },
  });
  return router;
}
