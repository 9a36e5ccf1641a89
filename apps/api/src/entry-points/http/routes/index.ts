import type { Router } from 'express';
import type { AppDeps } from '../../../app';
import { healthRoutes } from './health';

/**
 * Every API router, mounted under /api. Add one line per feature router.
 * Each router declares the access rule of every route it registers (see ../access.ts).
 */
export function registerRoutes(api: Router, deps: AppDeps): void {
  api.use(healthRoutes(deps.db));
}
