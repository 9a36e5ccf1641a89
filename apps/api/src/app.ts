import { existsSync } from 'node:fs';
import path from 'node:path';
import express, { type Express } from 'express';
import helmet from 'helmet';
import { pinoHttp } from 'pino-http';
import type { Logger } from 'pino';
import type { AppConfig } from './config';
import type { Db } from './data-access/db';
import { errorHandler, notFoundHandler } from './entry-points/http/middlewares/error-handler';
import { registerRoutes } from './entry-points/http/routes/index';

export interface AppDeps {
  config: AppConfig;
  db: Db;
  logger: Logger;
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
  app.use(express.json({ limit: '2mb' }));

  const api = express.Router();
  registerRoutes(api, deps);
  api.use(notFoundHandler);
  app.use('/api', api);

  if (config.webDist && existsSync(path.join(config.webDist, 'index.html'))) {
    const dist = path.resolve(config.webDist);
    app.use(express.static(dist, { index: false, maxAge: '1h' }));
    // Client-side routes: every other GET gets the single-page shell.
    app.get(/^\/(?!api\/).*/, (_req, res) => res.sendFile(path.join(dist, 'index.html')));
  }

  app.use(notFoundHandler);
  app.use(errorHandler(logger));
  return app;
}
