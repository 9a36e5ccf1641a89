import { Router, type Request } from 'express';
import { z } from 'zod';
import {
  countersignSchema,
  coursePlanParamsSchema,
  planCreateSchema,
  planParamsSchema,
  planTransitionSchema,
  planUpdateSchema,
  returnPlanSchema,
  type SigningStatus,
} from '@ebbtide/contracts';
import type { AppDeps } from '../../../app';
import { publicOrigin } from '../../../config';
import { planDeps, type PlanWiring } from '../../../domain/plans/plan-deps';
import {
  countersignPlan,
  createPlan,
  editPlan,
  getPlan,
  listCoursePlans,
  returnPlan,
  submitPlan,
  supersedePlan,
} from '../../../domain/plans/plans';
import { freshUntil, isFresh, type SigningAuthentication } from '../../../domain/plans/signing';
import { planChanges } from '../../../domain/reviews/changes';
import { planReport } from '../../../domain/plans/report';
import { AppError } from '../../../lib/app-error';
import { CLINICAL_STAFF, REVIEWERS, defineRoute, requireActor } from '../access';
import { parseRequest } from '../middlewares/validate';
import { createOidcClient, oidc } from './auth-oidc';

/** The app's deps (with its started job queue) and the optional test hooks of `planDeps`. */
type PlanAppDeps = AppDeps & Omit<PlanWiring, 'config' | 'boss'>;

/** The `auth_time` claim (seconds) of a stored ID token, if it has one. */
function authTimeOf(idToken: string | undefined): Date | null {
  const payload = idToken?.split('.')[1];
  if (!payload) return null;
  try {
    const claims = JSON.parse(Buffer.from(payload, 'base64url').toString('utf8')) as {
      auth_time?: unknown;
    };
    return typeof claims.auth_time === 'number' ? new Date(claims.auth_time * 1000) : null;
  } catch {
    return null;
  }
}

const REAUTH_PATH = '/api/signing/reauthenticate';

/**
 * When the person last entered credentials: the ID token's `auth_time` when the provider sent
 * one, else the time the session was signed in (the sign-in callback sets it).
 */
export function signingAuthentication(req: Request, windowMinutes: number): SigningAuthentication {
  const fromToken = authTimeOf(req.session?.idToken);
  const signedIn = req.session?.signedInAt ? new Date(req.session.signedInAt) : null;
  const authenticatedAt =
    fromToken ?? (signedIn && !Number.isNaN(signedIn.getTime()) ? signedIn : null);
  return { authenticatedAt, windowMinutes, reauthenticateUrl: REAUTH_PATH };
}

const returnToQuery = z
  .object({
    returnTo: z
      .string()
      .max(2000)
      .regex(/^\/(?!\/|\\)[^\s]*$/, 'must be a path on this site')
      .optional(),
  })
  .strict();

const versionBody = planTransitionSchema;

/**
 * Plans: draft, edit, submit, countersign, return, supersede, the changes since the last
 * countersigned plan, the PDF report, and the signing re-authentication.
 */
export function planRoutes(deps: PlanAppDeps): Router {
  const windowMinutes = deps.config.signingReauthMaxAgeMinutes;
  const router = Router();
  const pd = planDeps(deps);
  const oidcClient = createOidcClient(deps.config);
  const origin = publicOrigin(deps.config);

  defineRoute(router, {
    method: 'post',
    path: '/courses/:courseId/plans',
    allow: CLINICAL_STAFF,
    handler: async (req, res) => {
      const actor = requireActor(req);
      const { courseId } = parseRequest(req, 'params', coursePlanParamsSchema);
      const body = parseRequest(req, 'body', planCreateSchema);
      res.status(201).json(await createPlan(deps.db, actor, courseId, body, pd));
    },
  });

  defineRoute(router, {
    method: 'get',
    path: '/courses/:courseId/plans',
    allow: CLINICAL_STAFF,
    handler: async (req, res) => {
      const actor = requireActor(req);
      const { courseId } = parseRequest(req, 'params', coursePlanParamsSchema);
      res.json({ items: await listCoursePlans(deps.db, actor, courseId) });
    },
  });

  defineRoute(router, {
    method: 'get',
    path: '/plans/:id',
    allow: CLINICAL_STAFF,
    handler: async (req, res) => {
      const { id } = parseRequest(req, 'params', planParamsSchema);
      res.json(await getPlan(deps.db, requireActor(req), id));
    },
  });

  defineRoute(router, {
    method: 'patch',
    path: '/plans/:id',
    allow: CLINICAL_STAFF,
    handler: async (req, res) => {
      const { id } = parseRequest(req, 'params', planParamsSchema);
      const body = parseRequest(req, 'body', planUpdateSchema);
      res.json(await editPlan(deps.db, requireActor(req), id, body, pd));
    },
  });

  defineRoute(router, {
    method: 'post',
    path: '/plans/:id/submit',
    allow: CLINICAL_STAFF,
    handler: async (req, res) => {
      const { id } = parseRequest(req, 'params', planParamsSchema);
      const { version } = parseRequest(req, 'body', versionBody);
      const auth = signingAuthentication(req, windowMinutes);
      res.json(await submitPlan(deps.db, requireActor(req), id, version, auth, pd));
    },
  });

  defineRoute(router, {
    method: 'post',
    path: '/plans/:id/countersign',
    allow: REVIEWERS,
    handler: async (req, res) => {
      const { id } = parseRequest(req, 'params', planParamsSchema);
      const body = parseRequest(req, 'body', countersignSchema);
      const auth = signingAuthentication(req, windowMinutes);
      res.json(await countersignPlan(deps.db, requireActor(req), id, body, auth, pd));
    },
  });

  defineRoute(router, {
    method: 'post',
    path: '/plans/:id/return',
    allow: REVIEWERS,
    handler: async (req, res) => {
      const { id } = parseRequest(req, 'params', planParamsSchema);
      const body = parseRequest(req, 'body', returnPlanSchema);
      const auth = signingAuthentication(req, windowMinutes);
      res.json(await returnPlan(deps.db, requireActor(req), id, body, auth, pd));
    },
  });

  defineRoute(router, {
    method: 'post',
    path: '/plans/:id/supersede',
    allow: CLINICAL_STAFF,
    handler: async (req, res) => {
      const { id } = parseRequest(req, 'params', planParamsSchema);
      const { version } = parseRequest(req, 'body', versionBody);
      res.status(201).json(await supersedePlan(deps.db, requireActor(req), id, version, pd));
    },
  });

  defineRoute(router, {
    method: 'get',
    path: '/plans/:id/changes',
    allow: CLINICAL_STAFF,
    handler: async (req, res) => {
      const { id } = parseRequest(req, 'params', planParamsSchema);
      res.json(await planChanges(deps.db, requireActor(req), id));
    },
  });

  defineRoute(router, {
    method: 'get',
    path: '/plans/:id/report.pdf',
    allow: CLINICAL_STAFF,
    handler: async (req, res) => {
      const { id } = parseRequest(req, 'params', planParamsSchema);
      const { pdf, fileName } = await planReport(deps.db, requireActor(req), id, pd);
      res
        .status(200)
        .type('application/pdf')
        .set('content-disposition', `attachment; filename="${fileName}"`)
        .set('cache-control', 'no-store')
        .send(pdf);
    },
  });

  defineRoute(router, {
    method: 'get',
    path: '/signing/status',
    allow: CLINICAL_STAFF,
    handler: (req, res) => {
      requireActor(req);
      const auth = signingAuthentication(req, windowMinutes);
      const until = freshUntil(auth);
      const body: SigningStatus = {
        fresh: isFresh(auth),
        authenticatedAt: auth.authenticatedAt?.toISOString() ?? null,
        freshUntil: until?.toISOString() ?? null,
        windowMinutes,
        reauthenticateUrl: REAUTH_PATH,
      };
      res.json(body);
    },
  });

  // Re-asks for credentials at the identity provider (prompt=login, max_age=0) and comes back
  // through the ordinary sign-in callback, which records a fresh sign-in time in the session.
  defineRoute(router, {
    method: 'get',
    path: '/signing/reauthenticate',
    allow: CLINICAL_STAFF,
    handler: async (req, res) => {
      requireActor(req);
      const { returnTo = '/' } = parseRequest(req, 'query', returnToQuery);
      const configuration = await oidcClient.configuration().catch((cause: unknown) => {
        throw new AppError(
          'provider-unreachable',
          'The sign-in service is not answering; try again shortly',
          503,
          {},
          { cause },
        );
      });
      const codeVerifier = oidc.randomPKCECodeVerifier();
      const state = oidc.randomState();
      const nonce = oidc.randomNonce();
      req.session.pendingSignIn = { codeVerifier, state, nonce, returnTo };
      await new Promise<void>((resolve, reject) =>
        req.session.save((err?: unknown) => (err ? reject(err) : resolve())),
      );
      const url = oidc.buildAuthorizationUrl(configuration, {
        redirect_uri: `${origin}/auth/callback`,
        scope: deps.config.oidcScopes,
        code_challenge: await oidc.calculatePKCECodeChallenge(codeVerifier),
        code_challenge_method: 'S256',
        state,
        nonce,
        prompt: 'login',
        max_age: '0',
      });
      res.redirect(302, url.href);
    },
  });

  return router;
}
