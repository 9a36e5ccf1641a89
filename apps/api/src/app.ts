import { existsSync } from 'node:fs';
import path from 'node:path';
import express, { type Express } from 'express';
import helmet from 'helmet';
import type PgBoss from 'pg-boss';
import { pinoHttp } from 'pino-http';
import type { Logger } from 'pino';
import session from 'express-session';
import { publicOrigin, type AppConfig } from './config';
import type { Db } from './data-access/db';
import { createSessionStore } from './data-access/sessions';
import { findUserById } from './data-access/users';
import { actorLoader, crossOriginGuard, defineRoute } from './entry-points/http/access';
import { errorHandler, notFoundHandler } from './entry-points/http/middlewares/error-handler';
import { authRoutes } from './entry-points/http/routes/auth';
import { createOidcClient } from './entry-points/http/routes/auth-oidc';
import { PROVIDER_EVENTS_PATH } from './entry-points/http/routes/auth-provider-events';
import { registerRoutes } from './entry-points/http/routes/index';

export interface AppDeps {
  config: AppConfig;
  db: Db;
  logger: Logger;
  /**
   * The process's one job queue, already started by the caller (see jobs/queue.ts). Routes that
   * enqueue work (plan mail) use it; they never start a queue of their own.
   */
  boss: PgBoss;
}

/** Builds the Express app without listening, so supertest can drive it. */
export function createApp(deps: AppDeps): Express {
  const { config, logger } = deps;
  const app = express();
  app.disable('x-powered-by');
  app.set('trust proxy', 'loopback');
  app.use(
    helmet({
      contentSecurityPolicy: {
        directives: {
          defaultSrc: ["'self'"],
          imgSrc: ["'self'", 'data:'],
          styleSrc: ["'self'", "'unsafe-inline'"],
          fontSrc: ["'self'", 'data:'],
          upgradeInsecureRequests: null,
        },
      },
    }),
  );
  app.use(pinoHttp({ logger, autoLogging: { ignore: (req) => req.url === '/api/health' } }));
  app.use(
    express.json({
      limit: '2mb',
      // Signed server-to-server calls are verified over the exact bytes received.
      verify: (req, _res, buf) => {
        if ((req as { url?: string }).url === `/api${PROVIDER_EVENTS_PATH}`) {
          (req as { rawBody?: Buffer }).rawBody = buf;
        }
      },
    }),
  );

  // --- Sign-in, sessions and authorisation -------------------------------------------------
  // Server-side sessions in PostgreSQL (table `sessions`); the cookie only carries the signed id.
  const origin = publicOrigin(config);
  const sessionStore = createSessionStore(deps.db, {
    pruneIntervalSeconds: config.nodeEnv === 'test' ? false : 15 * 60,
  });
  const sessionMiddleware = session({
    name: config.sessionCookieName,
    secret: config.sessionSecret.split(',').map((s) => s.trim()),
    store: sessionStore,
    resave: false,
    saveUninitialized: false,
    cookie: {
      httpOnly: true,
      sameSite: 'lax',
      secure: origin.startsWith('https://'),
      path: '/',
      maxAge: config.sessionMaxAgeMinutes * 60_000,
    },
  });
  app.locals.sessionStore = sessionStore;
  app.locals.config = config;
  app.locals.db = deps.db;
  app.use(
    ['/api', '/auth'],
    sessionMiddleware,
    actorLoader((id) => findUserById(deps.db, id)),
  );
  app.use(crossOriginGuard([origin, ...config.trustedOrigins]));
  app.use(
    '/auth',
    authRoutes({ db: deps.db, config, oidcClient: createOidcClient(config) }),
    notFoundHandler,
  );

  const api = express.Router();
  registerRoutes(api, deps);
  api.use(notFoundHandler);
  app.use('/api', api);

  if (config.webDist && existsSync(path.join(config.webDist, 'index.html'))) {
    const dist = path.resolve(config.webDist);
    app.use(express.static(dist, { index: false, maxAge: '1h' }));
    // Client-side routes: every other GET gets the single-page shell.
    // (The client's route guards send a signed-out person to sign-in; the data is on /api.)
    defineRoute(app.router, {
      method: 'get',
      path: /^\/(?!api\/|auth\/).*/,
      allow: 'public',
      handler: (_req, res) => res.sendFile(path.join(dist, 'index.html')),
    });
  }

  app.use(notFoundHandler);
  app.use(errorHandler(logger));
  return app;
}
