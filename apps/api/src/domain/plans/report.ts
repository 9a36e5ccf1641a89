import type { DrugModelEntry } from '@ebbtide/kinetics';
import type { Conn } from '../../data-access/casework-db';
import { covariatesOfPatient } from '../../data-access/covariates-repo';
import { findPlan, signaturesOf, type PlanRecord } from '../../data-access/plans-repo';
import { notFound } from '../../lib/app-error';
import type { PlanReportModel, PlanReportPlot } from '../../reports/plan-report-model';
import { renderPlanReport } from '../../reports/render-plan-report';
import { requireCourse } from '../courses/courses';
import { computeDerived } from '../covariates/derived';
import { getDrugModel } from '../drug-models/drug-models';
import type { CaseworkActor } from '../patients/common';
import { ageOn } from '../patients/patients';
import { contentHash } from './content-hash';
import type { PlanEngineBasis } from './engine-basis';
import { reportCurves, reportDerivedValues } from './report-curves';
import { toPlanDto, type PlanContent, type PlanDeps } from './plans';

const DRUG_NAMES: Record<string, string> = {
  vancomycin: 'Vancomycin',
  gentamicin: 'Gentamicin',
  tobramycin: 'Tobramycin',
  amikacin: 'Amikacin',
  phenytoin: 'Phenytoin',
};
const ROUTES: Record<string, string> = {
  'iv-infusion': 'IV infusion',
  'iv-bolus': 'IV bolus',
  oral: 'oral',
  im: 'IM',
};
const TARGETS: Record<string, { metric: string; unit: string }> = {
  auc24: { metric: 'AUC24', unit: 'mg·h/L' },
  trough: { metric: 'Trough', unit: 'mg/L' },
  peak: { metric: 'Peak', unit: 'mg/L' },
  'peak-mic-ratio': { metric: 'Peak/MIC', unit: '' },
  css: { metric: 'Steady-state concentration', unit: 'mg/L' },
};
const COVARIATES: Record<string, { name: string; unit: string | null }> = {
  weight: { name: 'Weight', unit: 'kg' },
  height: { name: 'Height', unit: 'cm' },
  'serum-creatinine': { name: 'Serum creatinine', unit: 'µmol/L' },
  albumin: { name: 'Albumin', unit: 'g/L' },
  dialysis: { name: 'Dialysis', unit: null },
};
const PARAMETER_NAMES: Record<string, { name: string; unit: string }> = {
  CL: { name: 'Clearance (CL)', unit: 'L/h' },
  V: { name: 'Volume (V)', unit: 'L' },
  V1: { name: 'Central volume (V1)', unit: 'L' },
  V2: { name: 'Peripheral volume (V2)', unit: 'L' },
  Q: { name: 'Intercompartmental clearance (Q)', unit: 'L/h' },
  Vmax: { name: 'Vmax', unit: 'mg/h' },
  Km: { name: 'Km', unit: 'mg/L' },
  ka: { name: 'Absorption rate (ka)', unit: '1/h' },
};
const MEANINGS = {
  authored: 'authored',
  'reviewed-agree': 'reviewed – agree',
  returned: 'returned',
} as const;

const HOSPITAL_NAME = 'Kestrel Bay Regional Hospital';
/** The casework engine's note of the creatinine clearance a model used (domain/engine/context.ts). */
const CRCL_USED = 'crcl-used';

/** What the report shows beyond the stored plan, recomputed on the server from stored data. */
export interface PlanReportExtras {
  derived: PlanReportModel['derived'];
  curves: Pick<PlanReportPlot, 'population' | 'band' | 'bandLabel'> | null;
}

/**
 * Maps the stored plan, its course and patient into the report model. Every number comes from
 * what was stored (the plan content as recomputed by the server at submission) or, for the
 * derived values and the population curve and band, from `extras`, which `planReport` recomputes
 * from stored data.
 */
export function planReportModel(
  actor: CaseworkActor,
  plan: PlanRecord,
  signatures: Awaited<ReturnType<typeof signaturesOf>>,
  ctx: Awaited<ReturnType<typeof requireCourse>>,
  deps: Pick<PlanDeps, 'timeZone'>,
  extras: PlanReportExtras = { derived: [], curves: null },
  now = new Date(),
): PlanReportModel {
  const c = plan.content as unknown as PlanContent;
  const dto = toPlanDto(actor, plan, signatures);
  const hash = contentHash(plan.content);
  const { patient, course, model } = ctx;
  const basis = c.basis;
  const firstDose =
    basis?.doses
      .map((d) => d.startAt)
      .filter(Boolean)
      .sort()[0] ?? c.regimen.firstDoseAt;
  const target = TARGETS[course.target.metric] ?? { metric: course.target.metric, unit: '' };
  const predicted = basis?.predicted;
  // The CrCl the model used is printed with its formula under "Derived values", not as a warning.
  const warnings: PlanReportModel['warnings'] = dto.warnings
    .filter((w) => w.code !== CRCL_USED)
    .map((w) => ({ severity: 'warning', text: w.message }));
  for (const s of dto.signatures) {
    if (!s.matchesContent && s.meaning !== 'returned') {
      warnings.unshift({
        severity: 'warning',
        text: `Content changed after signing: the ${s.meaningLabel} signature of ${s.signerName} applies to earlier content (hash ${s.contentHash.slice(0, 12)}…)`,
      });
    }
  }
  return {
    hospitalName: HOSPITAL_NAME,
    timeBase: { kind: 'clock', timeZone: deps.timeZone },
    generatedAt: now.toISOString(),
    generatedBy: actor.displayName,
    plan: {
      id: plan.id,
      version: plan.planNumber,
      status: plan.state,
      recheckDueAt: c.recheckAt,
      contentHash: hash,
    },
    patient: {
      kind: 'patient',
      displayName: `${(patient.familyName ?? '').toUpperCase()}, ${patient.givenName ?? ''}`,
      mrn: patient.mrn,
      sex: patient.sex,
      age: patient.birthDate ? `${ageOn(patient.birthDate, now)} years` : null,
      dateOfBirth: patient.birthDate,
      ward: patient.ward,
    },
    course: {
      drug: DRUG_NAMES[course.drug] ?? course.drug,
      indication: course.indication,
      mic: course.micMgL ? { value: course.micMgL, unit: 'mg/L', method: course.micMethod } : null,
      target: {
        metric: target.metric,
        low: course.target.low,
        high: course.target.high,
        unit: target.unit,
      },
      model: {
        name: model.name,
        version: String(basis?.model.version ?? model.version),
        source: model.source,
      },
      startedAt: course.startedAt,
    },
    covariates: (basis?.covariates ?? []).map((cv) => ({
      name: COVARIATES[cv.kind]?.name ?? cv.kind,
      value: cv.canonicalValue ?? cv.detail ?? 'not recorded',
      unit: cv.canonicalValue === null ? null : (COVARIATES[cv.kind]?.unit ?? null),
      observedAt: cv.observedAt,
      source: cv.kind === 'weight' ? cv.detail : cv.kind === 'dialysis' ? null : 'laboratory',
    })),
    derived: extras.derived,
    doses: (basis?.doses ?? [])
      .filter((d) => d.startAt !== null)
      .map((d) => ({
        startAt: d.startAt!,
        amountMg: d.amountMg,
        route: ROUTES[d.route] ?? d.route,
        durationH: d.durationH,
        status: d.status as 'given' | 'missed' | 'partial',
      })),
    levels: (basis?.levels ?? [])
      .filter((l) => l.collectedAt !== null)
      .map((l) => ({
        sampledAt: l.collectedAt!,
        value: l.valueMgL,
        unit: 'mg/L',
        verdict: l.used ? 'used in the fit' : 'not used',
        reason: l.used ? null : basis?.method === 'map' ? 'left out of the fit' : 'no Bayesian fit',
        usedInFit: l.used,
      })),
    fit:
      basis && basis.method === 'map'
        ? {
            method: `Bayesian MAP (population prior + ${basis.levels.filter((l) => l.used).length} level(s))`,
            estimates: Object.entries(basis.parameters).map(([key, value]) => ({
              name: PARAMETER_NAMES[key]?.name ?? key,
              value,
              unit: PARAMETER_NAMES[key]?.unit ?? '',
              lower90: (basis as PlanEngineBasis).uncertainty?.[key]?.low ?? null,
              upper90: (basis as PlanEngineBasis).uncertainty?.[key]?.high ?? null,
              population: basis.populationParameters?.[key] ?? null,
            })),
            objective: null,
            shrinkage: [],
            note: 'Curves: the doses given and the planned regimen simulated with the individual estimates (solid) and the population values (dashed).',
            plot: {
              originAt: firstDose,
              observed: basis.levels
                .filter((l) => l.collectedAt)
                .map((l) => ({
                  t: (Date.parse(l.collectedAt!) - Date.parse(firstDose)) / 3_600_000,
                  c: l.valueMgL,
                  usedInFit: l.used,
                })),
              individual: (basis.profile ?? [])
                .filter((p) => p.at)
                .map((p) => ({
                  t: (Date.parse(p.at!) - Date.parse(firstDose)) / 3_600_000,
                  c: p.concentrationMgL,
                })),
              population: extras.curves?.population ?? [],
              band: extras.curves?.band ?? [],
              bandLabel: extras.curves?.bandLabel ?? 'no interval computed',
              doseTimes: [
                ...basis.doses.map((d) => d.startAt),
                ...c.regimen.doses.map((d) => d.startAt),
              ]
                .filter((t): t is string => t !== null)
                .map((t) => (Date.parse(t) - Date.parse(firstDose)) / 3_600_000),
            },
          }
        : null,
    regimens:
      predicted &&
      predicted.auc24 !== null &&
      predicted.peakMgL !== null &&
      predicted.troughMgL !== null
        ? [
            {
              doseMg: c.regimen.doseMg,
              intervalH: c.regimen.intervalH,
              infusionH: c.regimen.infusionH,
              route: c.regimen.route,
              loadingDoseMg: c.regimen.loadingDoseMg,
              loadingPortions: c.regimen.doses.filter((d) => d.number === 0).length || null,
              peak: predicted.peakMgL,
              trough: predicted.troughMgL,
              auc24: predicted.auc24,
              targetMet: basis?.meetsTarget === true,
              chosen: true,
              note:
                c.regimen.infusionRateMgPerH !== null
                  ? `Infusion rate ${c.regimen.infusionRateMgPerH} mg/h`
                  : null,
            },
          ]
        : [],
    administration: c.regimen.doses.map((d) => ({
      at: d.startAt,
      doseMg: d.doseMg,
      infusionH: c.regimen.infusionH > 0 ? c.regimen.infusionH : null,
      note: d.label,
    })),
    sampling: c.sampling.map((s) => {
      const dose = c.regimen.doses.find((d) => d.number === s.doseNumber)!;
      return {
        drawAt: s.at,
        kind: s.kind,
        anchor: {
          doseStartAt: dose.startAt,
          edge: s.anchor === 'after-end' ? ('end' as const) : ('start' as const),
          offsetMinutes: Math.round((s.anchor === 'before-start' ? -1 : 1) * s.offsetH * 60),
        },
        instruction: 'Peripheral stick, not the infusion lumen.',
      };
    }),
    warnings,
    rationale: c.rationale || null,
    signatures: signatures.map((s) => ({
      name: s.signerName,
      role: s.meaning === 'authored' ? 'Clinical pharmacist' : 'Reviewing pharmacist',
      meaning: MEANINGS[s.meaning],
      signedAt: s.signedAt,
      contentHash: s.contentHash,
      comment:
        s.contentHash === hash
          ? s.comment
          : `${s.comment ? `${s.comment} — ` : ''}content changed after signing`,
    })),
  };
}

/** GET /api/plans/:id/report.pdf */
export async function planReport(
  db: Conn,
  actor: CaseworkActor,
  id: string,
  deps: Pick<PlanDeps, 'timeZone'>,
  now = new Date(),
): Promise<{ pdf: Buffer; fileName: string }> {
  const plan = await findPlan(db, actor, id);
  if (!plan) throw notFound('Plan');
  const ctx = await requireCourse(db, actor, plan.courseId);
  const signatures = await signaturesOf(db, plan.id);
  const extras = await reportExtras(db, plan, ctx);
  const model = planReportModel(actor, plan, signatures, ctx, deps, extras, now);
  const pdf = await renderPlanReport(model);
  return { pdf, fileName: `plan-${plan.planNumber}-${plan.id.slice(0, 8)}.pdf` };
}

/**
 * Derived values and the plot's population curve and band, recomputed from what the plan stored:
 * the covariate rows its basis lists (as the patient screen computes them, at the basis time) and
 * the basis's model version, parameters, intervals and doses with the planned regimen.
 */
async function reportExtras(
  db: Conn,
  plan: PlanRecord,
  ctx: Awaited<ReturnType<typeof requireCourse>>,
): Promise<PlanReportExtras> {
  const c = plan.content as unknown as PlanContent;
  const basis = c.basis as PlanEngineBasis | null;
  if (!basis) return { derived: [], curves: null };
  const used = new Set(basis.covariates.map((cv) => cv.id));
  const covariates = (await covariatesOfPatient(db, ctx.patient.id)).filter((cv) =>
    used.has(cv.id),
  );
  const derived = reportDerivedValues(
    computeDerived(ctx.patient, covariates, new Date(basis.computedAt)),
    { crclUsedByModel: basis.warnings.some((w) => w.code === CRCL_USED) },
  );
  if (basis.method !== 'map') return { derived, curves: null };
  const model = await getDrugModel(db, basis.model.id, basis.model.version);
  const originAt =
    basis.doses
      .map((d) => d.startAt)
      .filter((t): t is string => t !== null)
      .sort()[0] ?? c.regimen.firstDoseAt;
  const curves = reportCurves(
    model.definition as unknown as DrugModelEntry,
    basis,
    c.regimen,
    originAt,
  );
  return { derived, curves };
}
