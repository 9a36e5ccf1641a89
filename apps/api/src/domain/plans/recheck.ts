import { inTransaction, type Conn } from '../../data-access/casework-db';
import { findPlanById, markRecheckMailed, overdueRechecks } from '../../data-access/plans-repo';
import { recheckOverdueMail } from '../../mail/templates';
import { recordAudit } from '../../data-access/audit';
import { planUrl, type PlanDeps } from './plans';

/**
 * Mails each plan's author once when a plan in force (submitted or countersigned) is past its
 * re-check time. The mark and the outbox row commit together, and the idempotency key makes a
 * second sweep (or a second process) harmless. Returns how many were mailed.
 */
export async function mailOverdueRechecks(
  db: Conn,
  deps: Pick<PlanDeps, 'mailer' | 'publicOrigin' | 'mailPolicy' | 'timeZone'>,
  now = new Date(),
): Promise<number> {
  let mailed = 0;
  for (const due of await overdueRechecks(db, now)) {
    const done = await inTransaction(db, async (trx) => {
      if (!(await markRecheckMailed(trx, due.id, now))) return false;
      const plan = (await findPlanById(trx, due.id))!;
      if (plan.authorEmail) {
        const ward = await trx('courses')
          .join('patients', 'patients.id', 'courses.patient_id')
          .where('courses.id', plan.courseId)
          .first('patients.ward');
        const mail = recheckOverdueMail(
          {
            planUrl: planUrl(deps, plan),
            planVersion: plan.planNumber,
            ward: (ward as { ward: string | null } | undefined)?.ward ?? null,
            recheckDueAt: new Date(plan.recheckAt!),
            timeZone: deps.timeZone,
          },
          deps.mailPolicy,
        );
        await deps.mailer.enqueue(trx, {
          idempotencyKey: `plan:${plan.id}:recheck-overdue:v${plan.planNumber}`,
          kind: 'plan.recheck-overdue',
          to: [plan.authorEmail],
          ...mail,
        });
      }
      await recordAudit(trx, {
        actor: null,
        action: 'plan.recheck-overdue',
        entityType: 'plan',
        entityId: plan.id,
        context: { planId: plan.id, courseId: plan.courseId, recheckAt: plan.recheckAt },
      });
      return true;
    });
    if (done) mailed += 1;
  }
  return mailed;
}

/** How often the re-check sweep runs by default. */
export const RECHECK_SWEEP_INTERVAL_SECONDS = 300;

/**
 * Starts the periodic re-check sweep: once now, then every `intervalSeconds`, each plan past its
 * re-check time mails its author once (a second process sweeping too is harmless, see above).
 * For the process that runs the background workers; returns a function that stops it and waits
 * for a sweep in progress.
 */
export function startRecheckSweep(
  db: Conn,
  deps: Pick<PlanDeps, 'mailer' | 'publicOrigin' | 'mailPolicy' | 'timeZone'>,
  options: { intervalSeconds?: number; onError: (error: unknown) => void },
): () => Promise<void> {
  let current: Promise<void> | null = null;
  const sweep = () => {
    if (current) return;
    current = mailOverdueRechecks(db, deps)
      .then(() => undefined)
      .catch(options.onError)
      .finally(() => {
        current = null;
      });
  };
  sweep();
  const timer = setInterval(
    sweep,
    (options.intervalSeconds ?? RECHECK_SWEEP_INTERVAL_SECONDS) * 1000,
  );
  timer.unref();
  return async () => {
    clearInterval(timer);
    await current;
  };
}
