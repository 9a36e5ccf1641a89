import type { Router } from 'express';
import type { AppDeps } from '../../../app';
import { providerEventRoutes } from './auth-provider-events';
import { healthRoutes } from './health';
import { meRoutes } from './me';
import { userRoutes } from './users';

/**
 * Every API router, mounted under /api. Add one line per feature router.
 * Each router declares the access rule of every route it registers (see ../access.ts).
 */
export function registerRoutes(api: Router, deps: AppDeps): void {
  api.use(healthRoutes(deps.db));
  api.use(meRoutes());
  api.use(userRoutes(deps.db));
  api.use(providerEventRoutes({ db: deps.db, secret: deps.config.idpEventSecret }));
}
