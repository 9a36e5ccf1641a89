import type { Warning } from '@ebbtide/contracts';
import {
  assessLevels,
  EngineError,
  populationPriorFromLibrary,
  type Dose,
  type DrugModelEntry,
  type LibraryPrior,
  type MeasuredLevel,
  type ModelStructure,
} from '@ebbtide/kinetics';
import type { Conn } from '../../data-access/casework-db';
import { covariatesOfPatient } from '../../data-access/covariates-repo';
import { dosesOfCourse, type DoseRecord } from '../../data-access/doses-repo';
import { levelsOfCourse, type LevelRecord } from '../../data-access/levels-repo';
import { AppError } from '../../lib/app-error';
import { requireCourse, type CourseContext } from '../courses/courses';
import { computeDerived, renalStabilityWarnings } from '../covariates/derived';
import type { CaseworkActor } from '../patients/common';
import { toPatientDto } from '../patients/patients';

/** On every dosing result: decision support only. */
export const CAUTION =
  'Ebbtide supports and does not replace clinical judgement. Check every result against the patient, local protocols and licensed practice before acting on it.';

/**
 * Everything the engine needs for one course, read from the database (the server never takes
 * numbers from the client): the model, the covariate-adjusted prior, doses and levels in hours
 * from the course's reference time (the first dose, or hour 0 of a teaching case).
 */
export interface EngineCase {
  ctx: CourseContext;
  entry: DrugModelEntry;
  structure: ModelStructure;
  prior: LibraryPrior;
  /** Real courses: the instant of hour 0. Teaching: null (hours as stored). */
  referenceAt: string | null;
  doses: Dose[];
  doseRecords: DoseRecord[];
  levels: MeasuredLevel[];
  levelRecords: LevelRecord[];
  warnings: Warning[];
}

export const hoursOf = (
  referenceAt: string | null,
  at: string | null,
  hour: number | null,
): number =>
  hour !== null ? hour : (Date.parse(at as string) - Date.parse(referenceAt as string)) / 3_600_000;

export const atOf = (referenceAt: string | null, hour: number): string | null =>
  referenceAt === null ? null : new Date(Date.parse(referenceAt) + hour * 3_600_000).toISOString();

/** Turns an EngineError into a 422 the client can show; anything else is rethrown. */
export function engineRefused(error: unknown): never {
  if (error instanceof EngineError) {
    throw new AppError('engine-refused', error.message, 422, {
      engineCode: error.code,
      ...(error.field ? { fieldErrors: { [error.field]: [error.message] } } : {}),
    });
  }
  throw error;
}

export async function loadEngineCase(
  db: Conn,
  actor: CaseworkActor,
  courseId: string,
  options: { excludeLevelIds?: string[] } = {},
  now = new Date(),
): Promise<EngineCase> {
  const ctx = await requireCourse(db, actor, courseId);
  const entry = ctx.model.definition as unknown as DrugModelEntry;
  const warnings: Warning[] = [];
  const doseRecords = await dosesOfCourse(db, courseId);
  const allLevels = await levelsOfCourse(db, courseId);
  const covariates = await covariatesOfPatient(db, ctx.patient.id);

  const firstDose = doseRecords[0];
  const referenceAt = ctx.course.isTeaching
    ? null
    : (firstDose?.startAt ??
      ctx.course.startedAt ??
      allLevels[0]?.collectedAt ??
      now.toISOString());

  const salt = entry.practical?.saltFactor;
  if (salt !== undefined && salt !== 1) {
    warnings.push({
      code: 'salt-factor',
      message: `Doses are taken as the salt form and multiplied by S = ${salt} (e.g. phenytoin sodium); check the product given.`,
    });
  }
  const doses: Dose[] = doseRecords
    .filter((d) => d.administrationStatus !== 'missed')
    .map((d) => {
      const time = hoursOf(referenceAt, d.startAt, d.startHour);
      const amount = d.amountMg * (salt ?? 1);
      if (d.route === 'iv-infusion')
        return { time, amount, route: 'infusion', duration: d.durationH as number };
      if (d.route === 'iv-bolus') return { time, amount, route: 'bolus' };
      return { time, amount, route: 'oral' };
    });
  const missed = doseRecords.filter((d) => d.administrationStatus === 'missed').length;
  if (missed)
    warnings.push({
      code: 'missed-doses',
      message: `${missed} missed dose(s) are left out of the dose history.`,
    });

  const exclude = new Set(options.excludeLevelIds ?? []);
  const levelRecords = allLevels.filter((l) => !exclude.has(l.id) && l.fraction === 'total');
  if (allLevels.some((l) => l.fraction === 'free')) {
    warnings.push({
      code: 'free-levels-ignored',
      message: 'Free (unbound) levels are not used: the model describes total concentrations.',
    });
  }
  const levels: MeasuredLevel[] = levelRecords.map((l) => {
    const lloqMgL =
      l.assayLowerLimit === null ? undefined : (l.assayLowerLimit * l.valueMgL) / (l.value || 1);
    return {
      time: hoursOf(referenceAt, l.collectedAt, l.collectedHour),
      value: l.valueMgL,
      lloq: l.value === 0 && l.assayLowerLimit !== null ? l.assayLowerLimit : lloqMgL,
      blq: l.flags.includes('below-assay-limit') || undefined,
      kind: l.sampleKind === 'trough' || l.sampleKind === 'peak' ? l.sampleKind : 'random',
    };
  });
  if (levelRecords.some((l) => l.flags.includes('during-infusion'))) {
    warnings.push({
      code: 'level-during-infusion',
      message:
        'A level drawn during an infusion is included; only a Bayesian fit can use it, and it weighs heavily on the central volume.',
    });
  }

  // Covariates for the model's relations, from the latest recorded values.
  const derived = computeDerived(ctx.patient, covariates, now);
  for (const w of derived.warnings) if (w.code !== 'unstable-renal-function') warnings.push(w);
  warnings.push(...renalStabilityWarnings(covariates));
  const values: Record<string, number> = {};
  const missing: string[] = [];
  for (const c of entry.covariates ?? []) {
    const v =
      c.name === 'CRCL'
        ? derived.creatinineClearance?.value
        : c.name === 'WT'
          ? (derived.inputs.weightKg ?? undefined)
          : c.name === 'HD'
            ? derived.inputs.dialysisStatus === 'intermittent-haemodialysis'
              ? 1
              : 0
            : c.name === 'AGE'
              ? toPatientDto(ctx.patient, now).ageYears
              : c.name === 'HT'
                ? (derived.inputs.heightCm ?? undefined)
                : undefined;
    if (v === undefined) missing.push(`${c.name} (${c.description})`);
    else values[c.name] = v;
  }
  if (missing.length) {
    throw new AppError(
      'missing-covariates',
      `The model ${entry.id} needs ${missing.join(', ')}: record the missing covariates first.`,
      422,
      {
        fieldErrors: { covariates: missing.map((m) => `missing ${m}`) },
      },
    );
  }
  if (derived.creatinineClearance && values.CRCL !== undefined) {
    warnings.push({ code: 'crcl-used', message: derived.creatinineClearance.formula });
  }
  let prior: LibraryPrior;
  try {
    const built = populationPriorFromLibrary(entry, values);
    prior = built.prior;
    warnings.push(...built.warnings);
  } catch (error) {
    engineRefused(error);
  }
  // Level timing read against the dose history, so every engine answer carries the timing pitfalls.
  if (levels.length > 0 && doses.length > 0) {
    const t = prior.typical;
    const halfLife = t.CL && t.V1 ? (Math.LN2 * (t.V1 + (t.V2 ?? 0))) / t.CL : undefined;
    try {
      const assessed = assessLevels({ doses, levels, halfLife, drug: ctx.course.drug });
      if (assessed.some((a) => levels[a.level]?.kind === 'trough' && a.steadyState === false)) {
        warnings.push({
          code: 'non-steady-state-trough',
          message:
            'A trough was drawn before steady state: do not read it as a steady-state trough unless a Bayesian fit is used.',
        });
      }
      if (assessed.some((a) => a.earlyTrough)) {
        warnings.push({
          code: 'early-trough',
          message: 'A trough was drawn early, well before the next dose was due.',
        });
      }
    } catch {
      // The level-validity endpoint reports the engine's refusal itself.
    }
  }
  if (levels.length === 1) {
    warnings.push({
      code: 'single-level',
      message: 'Only one level informs the estimate: it leans on the population prior.',
    });
  }
  return {
    ctx,
    entry,
    structure: entry.structure,
    prior,
    referenceAt,
    doses,
    doseRecords,
    levels,
    levelRecords,
    warnings,
  };
}

/** De-duplicates warnings by code and message. */
export function uniqueWarnings(list: readonly Warning[]): Warning[] {
  const seen = new Set<string>();
  return list.filter((w) => {
    const k = `${w.code}|${w.message}`;
    if (seen.has(k)) return false;
    seen.add(k);
    return true;
  });
}
