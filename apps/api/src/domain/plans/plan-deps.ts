import type PgBoss from 'pg-boss';
import { publicOrigin, type AppConfig } from '../../config';
import type { Conn } from '../../data-access/casework-db';
import { enqueueMail } from '../../mail/outbox';
import { fitCourse, simulateCourse } from '../engine/engine';
import type { CourseEngine } from './engine-basis';
import type { PlanDeps, PlanMailer } from './plans';

/**
 * The casework engine use cases a plan rests on: the very functions behind POST
 * /api/courses/:id/fit and /simulate, so a plan shows the numbers the regimen screen showed.
 */
export const caseworkCourseEngine: CourseEngine = { fit: fitCourse, simulate: simulateCourse };

export interface PlanWiring {
  config: AppConfig;
  /** The process's one started job queue. */
  boss: PgBoss;
  /** Replaces the casework engine (tests of an engine failure only). */
  courseEngine?: CourseEngine;
  /** The pg-boss queue mail jobs go to (tests isolate themselves with their own). */
  mailQueueName?: string;
}

/** The mail outbox writer, on the process's one job queue. */
export function outboxMailer(deps: Pick<PlanWiring, 'boss' | 'mailQueueName'>): PlanMailer {
  return {
    enqueue: async (conn: Conn, message) => {
      await enqueueMail(conn, message, {
        boss: deps.boss,
        ...(deps.mailQueueName ? { queueName: deps.mailQueueName } : {}),
      });
    },
  };
}

/** What the plan use cases need, from the app's config and job queue. */
export function planDeps(deps: PlanWiring): PlanDeps {
  return {
    engine: deps.courseEngine ?? caseworkCourseEngine,
    mailer: outboxMailer(deps),
    timeZone: deps.config.hospitalTimeZone,
    publicOrigin: publicOrigin(deps.config),
    mailPolicy: deps.config.mailPatientDetail,
  };
}
