/**
 * Authorisation: the ONE place where the API decides who may call what.
 *
 * Writing a new route
 * -------------------
 *   import { defineRoute, requireActor, CLINICAL_STAFF } from '../access';
 *
 *   export function patientRoutes(deps: AppDeps): Router {
 *     const router = Router();
 *     defineRoute(router, {
 *       method: 'get',
 *       path: '/patients/:id',
 *       allow: CLINICAL_STAFF,            // 'public' | 'signed-in' | Role[]
 *       handler: async (req, res) => {
 *         const actor = requireActor(req); // the signed-in user, a plain object
 *         const { id } = parseRequest(req, 'params', idParams);
 *         res.json(await getPatient(deps.db, actor, id)); // domain gets the actor, never req
 *       },
 *     });
 *     return router;
 *   }
 *
 * `defineRoute` puts the access check in front of the handler and tags it with the rule, so the
 * authorisation matrix test (apps/api/test/access-matrix.test.ts) can walk the Express router and
 * fail for any route registered without a rule. Never call `router.get(...)` directly.
 * Failures are AppErrors: 401 `not-signed-in`, 403 `forbidden`, JSON through the error middleware.
 *
 * Writing a trainee-confined query
 * --------------------------------
 * Role checks here decide whether a route may be called at all. Which rows come back is decided
 * in the data-access layer: every query that can return patients (or anything hanging off a
 * patient) goes through `restrictToTeachingFor(actor, query)` from `data-access/scope.ts`, which
 * adds `where patients.is_teaching = true` for a trainee (and fails closed for an unknown role), so
 * a trainee can never receive an identifiable patient whatever the URL:
 *
 *   export function findPatient(db: Db, actor: Actor, id: string) {
 *     return restrictToTeachingFor(actor, db('patients').where('patients.id', id)).first();
 *   }
 */
import { createHmac, timingSafeEqual } from 'node:crypto';
import type { Request, RequestHandler, Response, Router } from 'express';
import type { Role } from '@ebbtide/contracts';
import type { Actor } from '../../domain/auth/actor';
import { AppError } from '../../lib/app-error';

export type { Actor };

declare global {
  // eslint-disable-next-line @typescript-eslint/no-namespace -- Express's own augmentation point
  namespace Express {
    interface Request {
      /** Set by the session middleware when the request carries a valid session of a known user. */
      actor?: Actor;
    }
  }
}

/** Who may call a route: anyone, any signed-in user, or the listed roles. */
export type AccessRule = 'public' | 'signed-in' | readonly Role[];

/** pharmacist and reviewer: identifiable patients, courses, doses, levels, plans. */
export const CLINICAL_STAFF: readonly Role[] = ['pharmacist', 'reviewer'];
/** Countersigning and returning plans. */
export const REVIEWERS: readonly Role[] = ['reviewer'];
/** Teaching cases: trainees and the pharmacists who teach them. */
export const TEACHING: readonly Role[] = ['pharmacist', 'reviewer', 'trainee'];
/** Users' roles, the drug-model library, the audit trail. */
export const ADMINS: readonly Role[] = ['admin'];

export type HttpMethod = 'get' | 'post' | 'put' | 'patch' | 'delete';

export interface RouteDefinition {
  method: HttpMethod;
  path: string | RegExp;
  allow: AccessRule;
  handler: (req: Request, res: Response) => unknown;
}

type GuardHandler = RequestHandler & { accessRule: AccessRule };

export const notSignedIn = () => new AppError('not-signed-in', 'Sign in to continue', 401);
export const forbidden = () =>
  new AppError('forbidden', 'Your role does not allow this action', 403);

/** Throws 401/403 unless the actor satisfies the rule. */
export function authorise(actor: Actor | undefined, rule: AccessRule): void {
  if (rule === 'public') return;
  if (!actor) throw notSignedIn();
  if (rule === 'signed-in') return;
  if (!rule.includes(actor.role)) throw forbidden();
}

/** The signed-in actor of a request; 401 when there is none. Use inside non-public handlers. */
export function requireActor(req: Request): Actor {
  if (!req.actor) throw notSignedIn();
  return req.actor;
}

function accessGuard(rule: AccessRule): GuardHandler {
  const guard = ((req, _res, next) => {
    authorise(req.actor, rule);
    next();
  }) as GuardHandler;
  guard.accessRule = rule;
  return guard;
}

/** Registers a route with its access rule; the only way routes are added to the API. */
export function defineRoute(router: Router, def: RouteDefinition): void {
  const handler: RequestHandler = async (req, res, next) => {
    try {
      await def.handler(req, res);
    } catch (error) {
      next(error);
    }
  };
  router[def.method](def.path, accessGuard(def.allow), handler);
}

/** One registered route, as found by walking the Express router stack. */
export interface RegisteredRoute {
  method: string;
  path: string;
  /** undefined when the route was registered without defineRoute. */
  rule: AccessRule | undefined;
}

interface StackLayer {
  route?: { path: string | RegExp; methods: Record<string, boolean>; stack: StackLayer[] };
  handle: { stack?: StackLayer[]; accessRule?: AccessRule };
  rawPath?: string | RegExp;
}

/** Every route of an Express app or router, with the rule defineRoute tagged it with. */
export function listRoutes(root: { router?: unknown; stack?: unknown }): RegisteredRoute[] {
  const found: RegisteredRoute[] = [];
  const walk = (stack: StackLayer[], prefix: string) => {
    for (const layer of stack) {
      if (layer.route) {
        const routePath = String(layer.route.path);
        const rule = layer.route.stack.find((l) => l.handle.accessRule !== undefined)?.handle
          .accessRule;
        for (const method of Object.keys(layer.route.methods)) {
          if (method === '_all') continue;
          found.push({ method, path: joinPath(prefix, routePath), rule });
        }
      } else if (Array.isArray(layer.handle.stack)) {
        const mount = typeof layer.rawPath === 'string' ? layer.rawPath : '';
        walk(layer.handle.stack, joinPath(prefix, mount));
      }
    }
  };
  const top = (root.router as { stack?: StackLayer[] } | undefined)?.stack ?? root.stack;
  walk((top as StackLayer[] | undefined) ?? [], '');
  return found;
}

function joinPath(prefix: string, path: string): string {
  if (path.startsWith('/^') || path.startsWith('^')) return `${prefix}${path}`; // a RegExp route
  const joined = `${prefix.replace(/\/$/, '')}/${path.replace(/^\//, '')}`;
  return joined.length > 1 ? joined.replace(/\/$/, '') : joined;
}

/**
 * Loads `req.actor` from the users table on every request that carries a session of a signed-in
 * user, so a role changed by an admin applies from the user's next request.
 */
export function actorLoader(
  findUser: (id: string) => Promise<(Omit<Actor, 'userId'> & { id: string }) | undefined>,
): RequestHandler {
  return async (req, _res, next) => {
    try {
      const userId = req.session?.userId;
      if (userId) {
        const user = await findUser(userId);
        if (user) {
          req.actor = {
            userId: user.id,
            subject: user.subject,
            displayName: user.displayName,
            email: user.email,
            role: user.role,
          };
        }
      }
      next();
    } catch (error) {
      next(error);
    }
  };
}

const SAFE_METHODS = new Set(['GET', 'HEAD', 'OPTIONS']);

/**
 * CSRF defence for state-changing requests, on top of SameSite=Lax cookies: a browser request
 * must come from one of our origins. Browsers send `Origin` (and `Sec-Fetch-Site`) on every
 * cross-origin POST/PUT/PATCH/DELETE; a request with neither is not from a browser and cannot
 * carry a victim's cookie, so it is let through (the same rule as Go's CrossOriginProtection).
 */
export function crossOriginGuard(trustedOrigins: readonly string[]): RequestHandler {
  const trusted = new Set(trustedOrigins.map((o) => new URL(o).origin));
  return (req, _res, next) => {
    if (SAFE_METHODS.has(req.method)) return next();
    const origin = req.get('origin');
    const site = req.get('sec-fetch-site');
    if (origin !== undefined) {
      if (origin !== 'null' && trusted.has(origin)) return next();
      return next(crossOriginRefused());
    }
    if (site !== undefined && site !== 'same-origin' && site !== 'none') {
      return next(crossOriginRefused());
    }
    return next();
  };
}

const crossOriginRefused = () =>
  new AppError(
    'cross-origin-refused',
    'This request did not come from Ebbtide and was refused',
    403,
  );

/**
 * Server-to-server calls signed with a shared secret (the local identity provider reporting failed
 * sign-ins): header `x-ebbtide-signature: t=<unix seconds>,v1=<hex HMAC-SHA256(secret, t + "." + body)>`,
 * at most five minutes old. Throws 401 otherwise.
 */
export function verifySignedRequest(req: Request, secret: string, now = Date.now()): void {
  const header = req.get('x-ebbtide-signature') ?? '';
  const parts = Object.fromEntries(
    header.split(',').map((p) => p.split('=', 2) as [string, string | undefined]),
  );
  const t = Number(parts.t);
  const given = parts.v1 ?? '';
  const raw = (req as Request & { rawBody?: Buffer }).rawBody;
  if (
    !Number.isFinite(t) ||
    Math.abs(now / 1000 - t) > 300 ||
    !raw ||
    !/^[0-9a-f]{64}$/.test(given)
  ) {
    throw new AppError('bad-signature', 'The request signature is missing or not valid', 401);
  }
  const expected = createHmac('sha256', secret).update(`${t}.`).update(raw).digest();
  if (!timingSafeEqual(expected, Buffer.from(given, 'hex'))) {
    throw new AppError('bad-signature', 'The request signature is missing or not valid', 401);
  }
}
