/**
 * Shared set-up of the plan, review, teaching and audit API tests: the real app on the real
 * PostgreSQL, with a started job queue handed in (as the server does), and helpers that create a
 * real patient's course with doses and levels through the casework API.
 */
import { randomBytes } from 'node:crypto';
import type { Express } from 'express';
import type PgBoss from 'pg-boss';
import { drugModelLibrary, vancomycinGoti2018 } from '@ebbtide/kinetics';
import { createApp } from '../src/app';
import { loadConfig, type AppConfigInput } from '../src/config';
import { createDb, type Db } from '../src/data-access/db';
import { syncEngineLibrary } from '../src/domain/drug-models/drug-models';
import { createJobQueue } from '../src/jobs/queue';
import { createLogger } from '../src/lib/logger';
import { ensureMailQueue } from '../src/mail/mail-worker';
import type { SignedInClient } from './support/sign-in';

export const VANCOMYCIN_MODEL = vancomycinGoti2018.id;

export interface PlanWorld {
  app: Express;
  db: Db;
  boss: PgBoss;
  stop: () => Promise<void>;
}

export async function startPlanWorld(
  overrides: Partial<AppConfigInput> = {},
  options: { mailQueueName?: string } = {},
): Promise<PlanWorld> {
  if (!process.env.DATABASE_URL) throw new Error('DATABASE_URL is not set');
  const config = loadConfig(process.env, { logLevel: 'silent', nodeEnv: 'test', ...overrides });
  const db = createDb(config.databaseUrl);
  const boss = createJobQueue(config, { supervise: false, schedule: false, max: 2 });
  boss.on('error', () => {});
  await boss.start();
  await ensureMailQueue(boss);
  if (options.mailQueueName) await ensureMailQueue(boss, options.mailQueueName);
  await syncEngineLibrary(db, drugModelLibrary);
  const deps = { config, db, logger: createLogger(config), boss, ...options };
  const app = createApp(deps);
  return {
    app,
    db,
    boss,
    stop: async () => {
      await boss.stop({ graceful: false, wait: true });
      await db.destroy();
    },
  };
}

export const mrn = () => `KB-${randomBytes(5).toString('hex').toUpperCase()}`;
export const hoursAgo = (h: number) => new Date(Date.now() - h * 3_600_000).toISOString();
export const hoursFromNow = (h: number) => new Date(Date.now() + h * 3_600_000).toISOString();

async function ok<T>(res: { status: number; body: T }, expected: number, what: string): Promise<T> {
  if (res.status !== expected) {
    throw new Error(`${what}: expected ${expected}, got ${res.status} ${JSON.stringify(res.body)}`);
  }
  return res.body;
}

/**
 * A real (identifiable, invented) vancomycin patient with covariates, a course, three doses given
 * 12-hourly from 36 h ago and two levels.
 */
export async function realCourse(
  pharmacist: SignedInClient,
  options: { ward?: string; levels?: boolean } = {},
): Promise<{ patientId: string; courseId: string }> {
  const patient = await ok(
    await pharmacist.post('/api/patients').send({
      mrn: mrn(),
      givenName: 'Marlowe',
      familyName: 'Quenby',
      sex: 'male',
      birthDate: '1961-05-20',
      ward: options.ward ?? '4 North',
    }),
    201,
    'patient',
  );
  for (const c of [
    { kind: 'weight', value: 82, unit: 'kg', weightSource: 'measured', observedAt: hoursAgo(40) },
    { kind: 'height', value: 178, unit: 'cm', observedAt: hoursAgo(40) },
    { kind: 'serum-creatinine', value: 90, unit: 'umol/L', observedAt: hoursAgo(38) },
  ]) {
    await ok(
      await pharmacist.post(`/api/patients/${patient.id}/covariates`).send(c),
      201,
      'covariate',
    );
  }
  const course = await ok(
    await pharmacist.post(`/api/patients/${patient.id}/courses`).send({
      drug: 'vancomycin',
      modelId: VANCOMYCIN_MODEL,
      indication: 'MRSA bacteraemia',
      micMgL: 1,
      micMethod: 'broth microdilution',
      target: { metric: 'auc24', low: 400, high: 600 },
      startedAt: hoursAgo(37),
    }),
    201,
    'course',
  );
  for (const h of [36, 24, 12]) {
    await ok(
      await pharmacist.post(`/api/courses/${course.id}/doses`).send({
        amount: 1250,
        unit: 'mg',
        route: 'iv-infusion',
        startAt: hoursAgo(h),
        infusionMinutes: 90,
      }),
      201,
      'dose',
    );
  }
  if (options.levels !== false) {
    for (const [h, v, kind] of [
      [21.5, 28.5, 'peak'],
      [12.5, 11.2, 'trough'],
    ] as const) {
      await ok(
        await pharmacist.post(`/api/courses/${course.id}/levels`).send({
          value: v,
          unit: 'mg/L',
          collectedAt: hoursAgo(h),
          sampleKind: kind,
        }),
        201,
        'level',
      );
    }
  }
  return { patientId: patient.id, courseId: course.id };
}

/** The regimen body of "Use this regimen". */
export const regimenBody = (overrides: Record<string, unknown> = {}) => ({
  doseMg: 1250,
  intervalH: 12,
  infusionH: 1.5,
  route: 'iv-infusion',
  count: 6,
  startAt: hoursFromNow(2),
  rationale: 'AUC24 below target on the current regimen; same dose, keep 12-hourly.',
  ...overrides,
});
