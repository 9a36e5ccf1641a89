import type { Router } from 'express';
import type { AppDeps } from '../../../app';
import { auditRoutes } from './audit';
import { providerEventRoutes } from './auth-provider-events';
import { caseloadRoutes } from './caseload';
import { courseRoutes } from './courses';
import { drugModelRoutes } from './drug-models';
import { engineRoutes } from './engine';
import { healthRoutes } from './health';
import { importRoutes } from './imports';
import { meRoutes } from './me';
import { patientRoutes } from './patients';
import { planRoutes } from './plans';
import { reviewRoutes } from './reviews';
import { teachingRoutes } from './teaching';
import { userRoutes } from './users';

/**
 * Every API router, mounted under /api. Add one line per feature router.
 * Each router declares the access rule of every route it registers (see ../access.ts).
 */
export function registerRoutes(api: Router, deps: AppDeps): void {
  api.use(healthRoutes(deps.db));
  api.use(meRoutes());
  api.use(userRoutes(deps.db));
  api.use(patientRoutes(deps.db));
  api.use(courseRoutes(deps.db));
  api.use(drugModelRoutes(deps.db));
  api.use(importRoutes(deps.db));
  api.use(engineRoutes(deps));
  api.use(caseloadRoutes(deps.db));
  api.use(planRoutes(deps));
  api.use(reviewRoutes(deps));
  api.use(teachingRoutes(deps));
  api.use(auditRoutes(deps));
  api.use(providerEventRoutes({ db: deps.db, secret: deps.config.idpEventSecret }));
}
