import { Router } from 'express';
import type { Db } from '../../../data-access/db';
import {
  providerEventSchema,
  recordProviderEvent,
} from '../../../domain/auth/record-provider-event';
import { defineRoute, verifySignedRequest } from '../access';
import { parseRequest } from '../middlewares/validate';

/** Route path the local identity provider posts its failed sign-ins to (under /api). */
export const PROVIDER_EVENTS_PATH = '/internal/identity-provider-events';

/**
 * POST /api/internal/identity-provider-events: the local provider has no database access, so it
 * reports failed and throttled sign-ins here, signed with the shared IDP_EVENT_SECRET. 'public' to
 * the session rules because the caller is a service, not a person; the signature is the check.
 */
export function providerEventRoutes(deps: { db: Db; secret: string }): Router {
  const router = Router();
  defineRoute(router, {
    method: 'post',
    path: PROVIDER_EVENTS_PATH,
    allow: 'public',
    handler: async (req, res) => {
      verifySignedRequest(req, deps.secret);
      const event = parseRequest(req, 'body', providerEventSchema);
      await recordProviderEvent(deps.db, event);
      res.status(204).end();
    },
  });
  return router;
}
