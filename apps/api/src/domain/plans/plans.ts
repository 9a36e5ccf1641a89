import { randomUUID } from 'node:crypto';
import {
  signatureMeaningLabels,
  type CountersignChecklist,
  type Plan,
  type PlanActions,
  type PlanBasis,
  type PlanCreate,
  type PlannedDraw,
  type PlannedRegimen,
  type PlanState,
  type PlanSummary,
  type PlanUpdate,
  type Regimen,
  type SampleDrawInput,
  type Target,
  type Warning,
} from '@ebbtide/contracts';
import { recordAudit } from '../../data-access/audit';
import { inTransaction, type Conn } from '../../data-access/casework-db';
import { dosesOfCourse } from '../../data-access/doses-repo';
import { findDrugModel } from '../../data-access/drug-models-repo';
import { oralLoadingPortionFor, routeProblem } from '../engine/engine';
import {
  findPlan,
  findPlanById,
  insertPlan,
  insertSignature,
  lockCourseAndNextPlanNumber,
  lockPlan,
  plansOfCourse,
  reviewerAddresses,
  signaturesOf,
  supersedeOtherCountersigned,
  transitionPlan,
  type PlanRecord,
  type SignatureRecord,
} from '../../data-access/plans-repo';
import { AppError, notFound } from '../../lib/app-error';
import type { OutgoingMail } from '../../mail/outbox';
import type { DrugModelEntry } from '@ebbtide/kinetics';
import {
  planCountersignedMail,
  planReturnedMail,
  planSubmittedMail,
  type MailPatientDetail,
} from '../../mail/templates';
import { requireCourse, type CourseContext } from '../courses/courses';
import { assertMayWrite, auditActor, invalid, type CaseworkActor } from '../patients/common';
import { CLINICAL_CAUTION } from './caution';
import { contentHash } from './content-hash';
import { computeBasis, engineUnavailable, type CourseEngine } from './engine-basis';
import { defaultSampling, planRegimen, planSampling, regimenWarnings } from './schedule';
import { assertFreshAuthentication, type SigningAuthentication } from './signing';

export { CLINICAL_CAUTION };

/** Puts a message in the mail outbox inside the caller's transaction. */
export interface PlanMailer {
  enqueue(conn: Conn, message: OutgoingMail): Promise<void>;
}

export interface PlanDeps {
  /** The casework engine; null while it is not wired (then nothing can be submitted). */
  engine: CourseEngine | null;
  mailer: PlanMailer;
  timeZone: string;
  /** Origin of the web app, for links in e-mails. */
  publicOrigin: string;
  mailPolicy: MailPatientDetail;
}

/** Everything a signature vouches for. Hashed with `contentHash`. */
export interface PlanContent {
  planId: string;
  courseId: string;
  patientId: string;
  planNumber: number;
  drug: string;
  target: Target;
  micMgL: number | null;
  regimenInput: Regimen & { startAt: string };
  regimen: PlannedRegimen;
  samplingInput: SampleDrawInput[];
  sampling: PlannedDraw[];
  recheckAt: string | null;
  rationale: string;
  basis: PlanBasis | null;
  timeZone: string;
}

const HOUR_MS = 3_600_000;
const EDITABLE: readonly PlanState[] = ['draft', 'returned'];

export const planUrl = (
  deps: Pick<PlanDeps, 'publicOrigin'>,
  p: { id: string; courseId: string },
) => `${deps.publicOrigin.replace(/\/$/, '')}/courses/${p.courseId}/plans/${p.id}`;

const contentOf = (p: PlanRecord) => p.content as unknown as PlanContent;

function actionsFor(actor: CaseworkActor, p: PlanRecord, supersededBy: string | null): PlanActions {
  const clinical = actor.role === 'pharmacist' || actor.role === 'reviewer';
  const author = actor.userId === p.authorUserId;
  const reviewer = actor.role === 'reviewer' && !author;
  return {
    edit: clinical && author && EDITABLE.includes(p.state),
    submit: clinical && author && EDITABLE.includes(p.state),
    countersign: reviewer && p.state === 'submitted',
    return: reviewer && p.state === 'submitted',
    supersede: clinical && p.state === 'countersigned' && supersededBy === null,
  };
}

function contentWarnings(c: PlanContent): Warning[] {
  const warnings = [...regimenWarnings(c.drug, c.regimen)];
  const scratch: Record<string, string[]> = {};
  planSampling(c.regimen, c.samplingInput, c.timeZone, scratch, warnings);
  if (c.basis) {
    warnings.push(...c.basis.warnings);
    if (c.basis.meetsTarget === false) {
      warnings.push({
        code: 'target-not-met',
        message: 'The predicted exposure of this regimen is outside the course target',
      });
    }
  } else {
    warnings.push({
      code: 'not-computed',
      message:
        'The engine has not computed this plan yet: it is recomputed on the server at submission',
    });
  }
  return warnings;
}

export function toPlanDto(
  actor: CaseworkActor,
  p: PlanRecord,
  signatures: SignatureRecord[],
): Plan {
  const c = contentOf(p);
  const hash = contentHash(p.content);
  return {
    id: p.id,
    version: p.version,
    courseId: p.courseId,
    patientId: c.patientId,
    planNumber: p.planNumber,
    state: p.state,
    authorUserId: p.authorUserId,
    authorName: p.authorName,
    drug: c.drug,
    target: c.target,
    regimen: c.regimen,
    sampling: c.sampling,
    recheckAt: c.recheckAt,
    rationale: c.rationale,
    predicted: c.basis?.predicted ?? null,
    basis: c.basis,
    warnings: contentWarnings(c),
    caution: CLINICAL_CAUTION,
    timeZone: c.timeZone,
    contentHash: hash,
    signatures: signatures.map((s) => ({
      id: s.id,
      signerUserId: s.signerUserId,
      signerName: s.signerName,
      meaning: s.meaning,
      meaningLabel: signatureMeaningLabels[s.meaning],
      signedAt: s.signedAt,
      contentHash: s.contentHash,
      matchesContent: s.contentHash === hash,
      comment: s.comment,
    })),
    returnComment: p.returnComment,
    supersedesPlanId: p.supersedesPlanId,
    supersededByPlanId: p.supersededByPlanId,
    submittedAt: p.submittedAt,
    countersignedAt: p.countersignedAt,
    createdAt: p.createdAt,
    updatedAt: p.updatedAt,
    actions: actionsFor(actor, p, p.supersededByPlanId),
  };
}

export const toPlanSummary = (p: PlanRecord): PlanSummary => ({
  id: p.id,
  version: p.version,
  courseId: p.courseId,
  planNumber: p.planNumber,
  state: p.state,
  authorName: p.authorName,
  submittedAt: p.submittedAt,
  countersignedAt: p.countersignedAt,
  createdAt: p.createdAt,
  updatedAt: p.updatedAt,
});

async function dto(conn: Conn, actor: CaseworkActor, p: PlanRecord): Promise<Plan> {
  return toPlanDto(actor, p, await signaturesOf(conn, p.id));
}

/** Loads a plan the actor may see; 404 otherwise (a trainee never learns a real plan exists). */
async function requirePlan(conn: Conn, actor: CaseworkActor, id: string): Promise<PlanRecord> {
  const plan = await findPlan(conn, actor, id);
  if (!plan) throw notFound('Plan');
  return plan;
}

function assertRealCourse(ctx: CourseContext): void {
  if (ctx.course.isTeaching) {
    throw new AppError(
      'teaching-course',
      'Plans on teaching cases are practice plans: submit them from the teaching screen',
      400,
    );
  }
}

function assertAuthor(actor: CaseworkActor, p: PlanRecord): void {
  if (actor.userId !== p.authorUserId) {
    throw new AppError('not-author', 'Only the author of this plan may change or submit it', 403);
  }
}

const locked = (p: PlanRecord) =>
  new AppError(
    'plan-locked',
    p.state === 'countersigned' || p.state === 'superseded'
      ? 'A countersigned plan is never edited: supersede it with a new version'
      : 'A submitted plan cannot be edited until the reviewer returns it',
    409,
    { state: p.state },
  );

const stale = (p: PlanRecord, yours: number) =>
  new AppError(
    'stale-version',
    `This plan was changed by someone else (you read version ${yours}, it is now version ${p.version}). Nothing was overwritten; review the current plan and try again.`,
    409,
    {
      yourVersion: yours,
      currentVersion: p.version,
      current: { state: p.state, version: p.version },
      yours: {},
    },
  );

/** Where the regimen starts: as given, else one interval after the last recorded dose, else the next hour. */
async function resolveFirstDose(
  conn: Conn,
  ctx: CourseContext,
  regimen: Regimen,
  errors: Record<string, string[]>,
  now: Date,
): Promise<Date> {
  if (regimen.startHour !== undefined) {
    (errors.startHour ??= []).push(
      'a real patient’s plan gives its first dose as a date and time (startAt)',
    );
  }
  if (regimen.startAt) return new Date(regimen.startAt);
  const doses = await dosesOfCourse(conn, ctx.course.id);
  const last = doses
    .map((d) => d.startAt)
    .filter((t): t is string => t !== null)
    .sort()
    .at(-1);
  if (last) return new Date(new Date(last).getTime() + regimen.intervalH * HOUR_MS);
  return new Date(Math.ceil(now.getTime() / HOUR_MS) * HOUR_MS);
}

interface ContentInput {
  regimen: Regimen;
  rationale: string;
  sampling: SampleDrawInput[] | undefined;
  recheckAt: string | null | undefined;
}

async function buildContent(
  conn: Conn,
  actor: CaseworkActor,
  ctx: CourseContext,
  ids: { planId: string; planNumber: number },
  input: ContentInput,
  deps: PlanDeps,
  basisMode: 'try' | 'require',
  now: Date,
): Promise<PlanContent> {
  const errors: Record<string, string[]> = {};
  const firstDose = await resolveFirstDose(conn, ctx, input.regimen, errors, now);
  const { startHour: _ignored, ...rest } = input.regimen;
  void _ignored;
  const regimenInput = { ...rest, startAt: firstDose.toISOString() };
  const model = await findDrugModel(conn, ctx.course.modelId, ctx.course.modelVersion);
  const routes = model?.definition.routes;
  if (Array.isArray(routes)) {
    const problem = routeProblem(
      { routes: routes as DrugModelEntry['routes'], title: model!.name },
      input.regimen,
    );
    if (problem) (errors.route ??= []).push(problem);
  }
  const portionMg = oralLoadingPortionFor(
    ctx.course.drug,
    model?.definition.practical as { oralLoadingPortionMg?: unknown } | undefined,
  );
  const regimen = planRegimen(regimenInput, firstDose, deps.timeZone, portionMg);
  const samplingInput = input.sampling ?? defaultSampling(regimen);
  const sampling = planSampling(regimen, samplingInput, deps.timeZone, errors, []);
  let recheckAt: string | null;
  if (input.recheckAt === undefined) {
    const lastDraw = sampling
      .map((s) => s.at)
      .sort()
      .at(-1);
    recheckAt = new Date(
      (lastDraw ? new Date(lastDraw).getTime() : firstDose.getTime() + 24 * HOUR_MS) + 6 * HOUR_MS,
    ).toISOString();
  } else {
    recheckAt = input.recheckAt;
  }
  if (recheckAt && new Date(recheckAt).getTime() < firstDose.getTime()) {
    (errors.recheckAt ??= []).push('the re-check time is before the first dose of the plan');
  }
  if (Object.keys(errors).length) throw invalid(errors);

  let basis: PlanBasis | null = null;
  if (deps.engine) {
    try {
      basis = await computeBasis(conn, actor, ctx, regimenInput, deps.engine, now);
    } catch (error) {
      if (basisMode === 'require') throw error;
    }
  } else if (basisMode === 'require') {
    throw engineUnavailable();
  }
  return {
    planId: ids.planId,
    courseId: ctx.course.id,
    patientId: ctx.patient.id,
    planNumber: ids.planNumber,
    drug: ctx.course.drug,
    target: ctx.course.target,
    micMgL: ctx.course.micMgL,
    regimenInput,
    regimen,
    samplingInput,
    sampling,
    recheckAt,
    rationale: input.rationale,
    basis,
    timeZone: deps.timeZone,
  };
}

const auditContext = (p: { id: string; courseId: string }, patientId: string) => ({
  planId: p.id,
  courseId: p.courseId,
  patientId,
});

/** "Use this regimen": a new draft plan for the course. */
export async function createPlan(
  db: Conn,
  actor: CaseworkActor,
  courseId: string,
  input: PlanCreate,
  deps: PlanDeps,
  now = new Date(),
): Promise<Plan> {
  const ctx = await requireCourse(db, actor, courseId);
  assertMayWrite(actor, ctx.course.isTeaching);
  assertRealCourse(ctx);
  const { rationale, sampling, recheckAt, ...regimen } = input;
  const id = randomUUID();
  return inTransaction(db, async (trx) => {
    const planNumber = await lockCourseAndNextPlanNumber(trx, courseId);
    const content = await buildContent(
      trx,
      actor,
      ctx,
      { planId: id, planNumber },
      { regimen, rationale: rationale ?? '', sampling, recheckAt },
      deps,
      'try',
      now,
    );
    const current = (await plansOfCourse(trx, courseId)).find((p) => p.state === 'countersigned');
    const created = await insertPlan(trx, {
      id,
      course_id: courseId,
      plan_number: planNumber,
      state: 'draft',
      author_user_id: actor.userId,
      supersedes_plan_id: current?.id ?? null,
      content: JSON.stringify(content),
      content_hash: contentHash(content),
      recheck_at: content.recheckAt,
    });
    await recordAudit(trx, {
      actor: auditActor(actor),
      action: 'plan.create',
      entityType: 'plan',
      entityId: id,
      after: { state: created.state, planNumber, content },
      context: auditContext(created, ctx.patient.id),
    });
    return dto(trx, actor, created);
  });
}

export async function getPlan(db: Conn, actor: CaseworkActor, id: string): Promise<Plan> {
  return dto(db, actor, await requirePlan(db, actor, id));
}

export async function listCoursePlans(
  db: Conn,
  actor: CaseworkActor,
  courseId: string,
): Promise<PlanSummary[]> {
  const ctx = await requireCourse(db, actor, courseId);
  return (await plansOfCourse(db, ctx.course.id)).map(toPlanSummary);
}

/** Edits a draft or returned plan (author only). */
export async function editPlan(
  db: Conn,
  actor: CaseworkActor,
  id: string,
  input: PlanUpdate,
  deps: PlanDeps,
  now = new Date(),
): Promise<Plan> {
  const before = await requirePlan(db, actor, id);
  assertAuthor(actor, before);
  const ctx = await requireCourse(db, actor, before.courseId);
  return inTransaction(db, async (trx) => {
    await lockPlan(trx, id);
    const current = (await findPlanById(trx, id))!;
    if (!EDITABLE.includes(current.state)) throw locked(current);
    if (current.version !== input.version) throw stale(current, input.version);
    const old = contentOf(current);
    const content = await buildContent(
      trx,
      actor,
      ctx,
      { planId: id, planNumber: current.planNumber },
      {
        regimen: input.regimen ?? old.regimenInput,
        rationale: input.rationale ?? old.rationale,
        sampling: input.sampling ?? (input.regimen ? undefined : old.samplingInput),
        recheckAt:
          input.recheckAt === undefined
            ? input.regimen
              ? undefined
              : old.recheckAt
            : input.recheckAt,
      },
      deps,
      'try',
      now,
    );
    const updated = await transitionPlan(trx, id, input.version, EDITABLE, {
      content: JSON.stringify(content),
      content_hash: contentHash(content),
      recheck_at: content.recheckAt,
    });
    if (!updated) throw stale(current, input.version);
    await recordAudit(trx, {
      actor: auditActor(actor),
      action: 'plan.update',
      entityType: 'plan',
      entityId: id,
      before: { version: current.version, content: old },
      after: { version: updated.version, content },
      context: auditContext(updated, ctx.patient.id),
    });
    return dto(trx, actor, updated);
  });
}

function mailContext(deps: PlanDeps, p: PlanRecord, ctx: CourseContext, actorName: string) {
  const initials = [ctx.patient.givenName, ctx.patient.familyName]
    .map((n) => n?.trim()[0])
    .filter(Boolean)
    .map((c) => `${c!.toUpperCase()}.`)
    .join('');
  return {
    planUrl: planUrl(deps, p),
    planVersion: p.planNumber,
    ward: ctx.patient.ward,
    patientInitials: initials || null,
    actorName,
  };
}

/** Submits a draft or returned plan for countersignature: recomputed, signed "authored", mailed. */
export async function submitPlan(
  db: Conn,
  actor: CaseworkActor,
  id: string,
  version: number,
  auth: SigningAuthentication,
  deps: PlanDeps,
  now = new Date(),
): Promise<Plan> {
  const before = await requirePlan(db, actor, id);
  assertMayWrite(actor, false);
  assertAuthor(actor, before);
  assertFreshAuthentication(auth, now);
  const ctx = await requireCourse(db, actor, before.courseId);
  return inTransaction(db, async (trx) => {
    await lockPlan(trx, id);
    const current = (await findPlanById(trx, id))!;
    if (!EDITABLE.includes(current.state)) throw locked(current);
    if (current.version !== version) throw stale(current, version);
    const old = contentOf(current);
    // The server recomputes the engine inputs and outputs now; it never trusts earlier numbers.
    const content = await buildContent(
      trx,
      actor,
      ctx,
      { planId: id, planNumber: current.planNumber },
      {
        regimen: old.regimenInput,
        rationale: old.rationale,
        sampling: old.samplingInput,
        recheckAt: old.recheckAt,
      },
      deps,
      'require',
      now,
    );
    const hash = contentHash(content);
    const updated = await transitionPlan(trx, id, version, EDITABLE, {
      state: 'submitted',
      content: JSON.stringify(content),
      content_hash: hash,
      recheck_at: content.recheckAt,
      submitted_at: now,
      recheck_mailed_at: null,
    });
    if (!updated) throw stale(current, version);
    await insertSignature(trx, {
      planId: id,
      signerUserId: actor.userId,
      signerName: actor.displayName,
      signerRole: actor.role,
      meaning: 'authored',
      signedAt: now,
      contentHash: hash,
      comment: null,
      checklist: null,
      authenticatedAt: auth.authenticatedAt?.toISOString() ?? null,
    });
    const reviewers = await reviewerAddresses(trx, actor.userId);
    if (reviewers.length > 0) {
      const mail = planSubmittedMail(
        mailContext(deps, updated, ctx, actor.displayName),
        deps.mailPolicy,
      );
      await deps.mailer.enqueue(trx, {
        idempotencyKey: `plan:${id}:submitted:v${updated.version}`,
        kind: 'plan.submitted',
        to: reviewers,
        ...mail,
      });
    }
    await recordAudit(trx, {
      actor: auditActor(actor),
      action: 'plan.submit',
      entityType: 'plan',
      entityId: id,
      before: { state: current.state, version: current.version, contentHash: current.contentHash },
      after: {
        state: 'submitted',
        version: updated.version,
        contentHash: hash,
        basis: content.basis,
      },
      context: { ...auditContext(updated, ctx.patient.id), mailedReviewers: reviewers.length },
    });
    return dto(trx, actor, updated);
  });
}

interface ReviewDecision {
  version: number;
  auth: SigningAuthentication;
}

async function decide(
  db: Conn,
  actor: CaseworkActor,
  id: string,
  decision: ReviewDecision &
    (
      | { kind: 'countersign'; contentHash: string; checklist: CountersignChecklist }
      | { kind: 'return'; comment: string }
    ),
  deps: PlanDeps,
  now: Date,
): Promise<Plan> {
  const before = await requirePlan(db, actor, id);
  if (actor.role !== 'reviewer') {
    throw new AppError('forbidden', 'Only a reviewer may countersign or return a plan', 403);
  }
  if (before.authorUserId === actor.userId) {
    throw new AppError(
      'own-plan',
      'You wrote this plan: another reviewer must countersign or return it',
      403,
    );
  }
  assertFreshAuthentication(decision.auth, now);
  const ctx = await requireCourse(db, actor, before.courseId);
  return inTransaction(db, async (trx) => {
    // Row lock: of two reviewers deciding at once, the second waits here and then sees the result.
    await lockPlan(trx, id);
    const current = (await findPlanById(trx, id))!;
    if (current.state !== 'submitted') {
      throw new AppError(
        'plan-not-submitted',
        current.state === 'countersigned'
          ? 'This plan has already been countersigned'
          : `This plan is ${current.state}, not awaiting review`,
        409,
        { state: current.state },
      );
    }
    if (current.version !== decision.version) throw stale(current, decision.version);
    const hash = contentHash(current.content);
    if (hash !== current.contentHash) {
      throw new AppError(
        'content-integrity',
        'The stored plan no longer matches the content that was submitted; it cannot be signed',
        409,
      );
    }
    if (decision.kind === 'countersign' && decision.contentHash !== hash) {
      throw new AppError(
        'content-changed',
        'The plan changed since you opened it; review the current content before signing',
        409,
        { contentHash: hash },
      );
    }
    const countersign = decision.kind === 'countersign';
    const updated = await transitionPlan(
      trx,
      id,
      decision.version,
      ['submitted'],
      countersign
        ? { state: 'countersigned', countersigned_at: now }
        : { state: 'returned', returned_at: now, return_comment: decision.comment },
    );
    if (!updated) throw stale(current, decision.version);
    await insertSignature(trx, {
      planId: id,
      signerUserId: actor.userId,
      signerName: actor.displayName,
      signerRole: actor.role,
      meaning: countersign ? 'reviewed-agree' : 'returned',
      signedAt: now,
      contentHash: hash,
      comment: countersign ? null : decision.comment,
      checklist: countersign ? decision.checklist : null,
      authenticatedAt: decision.auth.authenticatedAt?.toISOString() ?? null,
    });
    const superseded = countersign
      ? await supersedeOtherCountersigned(trx, current.courseId, id)
      : [];
    if (current.authorEmail) {
      const base = mailContext(deps, updated, ctx, actor.displayName);
      const mail = countersign
        ? planCountersignedMail(base, deps.mailPolicy)
        : planReturnedMail({ ...base, comment: decision.comment }, deps.mailPolicy);
      await deps.mailer.enqueue(trx, {
        idempotencyKey: `plan:${id}:${countersign ? 'countersigned' : 'returned'}:v${updated.version}`,
        kind: countersign ? 'plan.countersigned' : 'plan.returned',
        to: [current.authorEmail],
        ...mail,
      });
    }
    await recordAudit(trx, {
      actor: auditActor(actor),
      action: countersign ? 'plan.countersign' : 'plan.return',
      entityType: 'plan',
      entityId: id,
      before: { state: current.state, version: current.version },
      after: {
        state: updated.state,
        version: updated.version,
        contentHash: hash,
        ...(countersign
          ? { checklist: decision.checklist, superseded }
          : { comment: decision.comment }),
      },
      context: auditContext(updated, ctx.patient.id),
    });
    return dto(trx, actor, updated);
  });
}

export function countersignPlan(
  db: Conn,
  actor: CaseworkActor,
  id: string,
  input: { version: number; contentHash: string; checklist: CountersignChecklist },
  auth: SigningAuthentication,
  deps: PlanDeps,
  now = new Date(),
): Promise<Plan> {
  return decide(db, actor, id, { kind: 'countersign', ...input, auth }, deps, now);
}

export function returnPlan(
  db: Conn,
  actor: CaseworkActor,
  id: string,
  input: { version: number; comment: string },
  auth: SigningAuthentication,
  deps: PlanDeps,
  now = new Date(),
): Promise<Plan> {
  return decide(db, actor, id, { kind: 'return', ...input, auth }, deps, now);
}

/** Starts a new version of a countersigned plan: a draft copy that supersedes it once signed. */
export async function supersedePlan(
  db: Conn,
  actor: CaseworkActor,
  id: string,
  version: number,
  deps: PlanDeps,
  now = new Date(),
): Promise<Plan> {
  const before = await requirePlan(db, actor, id);
  assertMayWrite(actor, false);
  if (before.state !== 'countersigned') {
    throw new AppError(
      'not-countersigned',
      'Only the countersigned plan in force can be superseded; edit a draft or returned plan instead',
      409,
      { state: before.state },
    );
  }
  if (before.version !== version) throw stale(before, version);
  const open = (await plansOfCourse(db, before.courseId)).find(
    (p) => p.supersedesPlanId === id && ['draft', 'submitted', 'returned'].includes(p.state),
  );
  if (open) {
    throw new AppError(
      'new-version-in-progress',
      `Plan version ${open.planNumber} already replaces this plan; continue with it`,
      409,
      { planId: open.id },
    );
  }
  const old = contentOf(before);
  return createPlan(
    db,
    actor,
    before.courseId,
    {
      ...old.regimenInput,
      rationale: old.rationale,
      sampling: old.samplingInput,
      ...(old.recheckAt && new Date(old.recheckAt) > new Date(old.regimenInput.startAt)
        ? { recheckAt: old.recheckAt }
        : {}),
    },
    deps,
    now,
  );
}
