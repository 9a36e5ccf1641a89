import type { Drug, FhirImportResponse } from '@ebbtide/contracts';
import { drugSchema } from '@ebbtide/contracts';
import { recordAudit } from '../../data-access/audit';
import { inTransaction, type Conn } from '../../data-access/casework-db';
import { listCourses } from '../../data-access/courses-repo';
import { covariatesOfPatient, insertCovariate } from '../../data-access/covariates-repo';
import { dosesOfCourse, insertDoses, type DoseRecord } from '../../data-access/doses-repo';
import { insertLevels, levelsOfCourse } from '../../data-access/levels-repo';
import {
  findPatientByMrn,
  insertPatient,
  type PatientRecord,
} from '../../data-access/patients-repo';
import { AppError } from '../../lib/app-error';
import { requireCourse, type CourseContext } from '../courses/courses';
import { checkCovariateInput } from '../covariates/covariates';
import type { DoseInput } from '../doses/checks';
import { checkDoseBatch, doseColumns } from '../doses/doses';
import type { LevelInput } from '../levels/checks';
import { checkLevelBatch, infusionsOf, levelColumns } from '../levels/levels';
import { assertMayWrite, auditActor, type CaseworkActor } from '../patients/common';
import { ageOn } from '../patients/patients';
import { LOINC_MAP, LOINC_SYSTEM, RXNORM_DRUGS, UCUM_SYSTEM } from './loinc';

type Json = Record<string, unknown>;
type Entry = FhirImportResponse['entries'][number];

const obj = (v: unknown): Json | undefined =>
  v && typeof v === 'object' && !Array.isArray(v) ? (v as Json) : undefined;
const arr = (v: unknown): unknown[] => (Array.isArray(v) ? v : []);
const str = (v: unknown): string | undefined => (typeof v === 'string' && v.trim() ? v : undefined);
const num = (v: unknown): number | undefined =>
  typeof v === 'number' && Number.isFinite(v) ? v : undefined;

const label = (r: Json) => `${String(r.resourceType)}/${str(r.id) ?? '?'}`;

/** Observation statuses we import; anything else is skipped (never imported). */
const IMPORTED_OBSERVATION_STATUS = new Set(['final', 'amended', 'corrected']);

/** effective[x] as the clinically relevant time; `issued` is never used as the sample time. */
function effectiveTime(r: Json): string | undefined {
  const t =
    str(r.effectiveDateTime) ?? str(r.effectiveInstant) ?? str(obj(r.effectivePeriod)?.start);
  return t && !Number.isNaN(Date.parse(t)) ? new Date(t).toISOString() : undefined;
}

function quantity(q: Json | undefined): { value: number; code: string } | undefined {
  if (!q) return undefined;
  const value = num(q.value);
  const code = str(q.code) ?? str(q.unit);
  if (value === undefined || !code) return undefined;
  if (q.system !== undefined && q.system !== UCUM_SYSTEM) return undefined;
  return { value, code };
}

function drugOf(concept: Json | undefined): Drug | undefined {
  if (!concept) return undefined;
  for (const c of arr(concept.coding).map(obj)) {
    const code = str(c?.code);
    if (code && RXNORM_DRUGS[code]) return RXNORM_DRUGS[code];
    const display = (str(c?.display) ?? '').toLowerCase();
    const hit = drugSchema.options.find((d) => display.includes(d));
    if (hit) return hit;
  }
  const text = (str(concept.text) ?? '').toLowerCase();
  return drugSchema.options.find((d) => text.includes(d));
}

function patientIdentity(r: Json): {
  mrn?: string;
  family?: string;
  given?: string;
  birthDate?: string;
  sex?: 'female' | 'male';
  reasons: string[];
} {
  const reasons: string[] = [];
  const ids = arr(r.identifier).map(obj);
  const mr =
    ids.find((i) => arr(obj(i?.type)?.coding).some((c) => obj(c)?.code === 'MR')) ?? ids[0];
  const mrn = str(mr?.value);
  if (!mrn) reasons.push('Patient has no identifier (MRN)');
  const name = obj(arr(r.name)[0]);
  const family = str(name?.family);
  const given = str(arr(name?.given)[0]);
  const birthDate = str(r.birthDate);
  const gender = str(r.gender);
  const sex = gender === 'female' || gender === 'male' ? gender : undefined;
  if (gender && !sex)
    reasons.push(`Patient gender "${gender}": the dosing formulas need female or male`);
  return { mrn, family, given, birthDate, sex, reasons };
}

interface Plan {
  patient: PatientRecord | null;
  newPatient: {
    mrn: string;
    family: string;
    given: string;
    birthDate: string;
    sex: 'female' | 'male';
  } | null;
  covariates: Array<{ entry: Entry; input: Parameters<typeof checkCovariateInput>[1] }>;
  doses: Array<{ entry: Entry; drug: Drug; input: DoseInput }>;
  levels: Array<{ entry: Entry; drug: Drug; input: LevelInput }>;
}

/**
 * FHIR R4 Bundle import: Patient, MedicationAdministration (effectivePeriod, dosage.dose,
 * dosage.rate) and Observation (LOINC code, effective[x], valueQuantity in UCUM) mapped to our
 * tables. Unknown codes are reported and refuse the bundle; `commit` imports all or nothing.
 */
export async function importFhirBundle(
  db: Conn,
  actor: CaseworkActor,
  request: { bundle: Json; mode: 'preview' | 'commit'; courseId?: string },
  now = new Date(),
): Promise<FhirImportResponse> {
  if (actor.role !== 'pharmacist' && actor.role !== 'reviewer') assertMayWrite(actor, false);
  const entries: Entry[] = [];
  const unknownCodes = new Set<string>();
  const resources = arr(request.bundle.entry)
    .map((e) => obj(obj(e)?.resource))
    .filter((r): r is Json => !!r);
  const plan: Plan = { patient: null, newPatient: null, covariates: [], doses: [], levels: [] };

  let course: CourseContext | null = request.courseId
    ? await requireCourse(db, actor, request.courseId)
    : null;
  if (course?.course.isTeaching) {
    throw new AppError(
      'validation-failed',
      'FHIR bundles carry real dates; teaching cases use relative time',
      400,
      {
        fieldErrors: { courseId: ['a teaching course cannot receive a FHIR import'] },
      },
    );
  }

  // 1. The patient.
  const patients = resources.filter((r) => r.resourceType === 'Patient');
  const patientRefs = new Set<string>();
  if (patients.length > 1) {
    entries.push({
      resource: 'Bundle',
      target: 'patient',
      status: 'refused',
      reasons: ['the bundle has more than one Patient'],
      echo: null,
    });
  }
  const pr = patients[0];
  if (pr) {
    const entry: Entry = {
      resource: label(pr),
      target: 'patient',
      status: 'accepted',
      reasons: [],
      echo: null,
    };
    entries.push(entry);
    if (str(pr.id)) patientRefs.add(`Patient/${str(pr.id)}`);
    const id = patientIdentity(pr);
    entry.reasons.push(...id.reasons);
    if (id.mrn) {
      const existing = await findPatientByMrn(db, actor, id.mrn);
      if (existing) {
        plan.patient = existing;
        if (id.birthDate && existing.birthDate !== id.birthDate)
          entry.reasons.push(
            `birthDate ${id.birthDate} differs from the stored ${existing.birthDate}: check the identity`,
          );
        if (id.sex && existing.sex !== id.sex)
          entry.reasons.push(
            `gender ${id.sex} differs from the stored ${existing.sex}: check the identity`,
          );
        entry.echo = `matched MRN ${id.mrn}`;
      } else if (id.family && id.given && id.birthDate && id.sex) {
        if (Date.parse(id.birthDate) > now.getTime() || ageOn(id.birthDate, now) > 120)
          entry.reasons.push(`birthDate ${id.birthDate} is implausible`);
        plan.newPatient = {
          mrn: id.mrn,
          family: id.family,
          given: id.given,
          birthDate: id.birthDate,
          sex: id.sex,
        };
        entry.echo = `new patient MRN ${id.mrn}`;
      } else {
        entry.reasons.push('a new Patient needs name (family and given), birthDate and gender');
      }
    }
    if (entry.reasons.length) entry.status = 'refused';
  } else if (course) {
    plan.patient = course.patient;
  } else {
    entries.push({
      resource: 'Bundle',
      target: 'patient',
      status: 'refused',
      reasons: ['no Patient in the bundle and no courseId'],
      echo: null,
    });
  }
  if (course && plan.patient && course.patient.id !== plan.patient.id) {
    entries.push({
      resource: 'Bundle',
      target: 'patient',
      status: 'refused',
      reasons: ['the course belongs to another patient than the bundle'],
      echo: null,
    });
  }

  const subjectOk = (r: Json): boolean => {
    const ref = str(obj(r.subject)?.reference);
    if (!ref || patientRefs.size === 0) return true;
    return (
      patientRefs.has(ref) ||
      arr(request.bundle.entry).some(
        (e) => str(obj(e)?.fullUrl) === ref && obj(obj(e)?.resource)?.resourceType === 'Patient',
      )
    );
  };

  // 2. Observations and administrations.
  for (const r of resources) {
    if (r.resourceType === 'Patient') continue;
    const entry: Entry = {
      resource: label(r),
      target: 'skipped',
      status: 'accepted',
      reasons: [],
      echo: null,
    };
    entries.push(entry);
    if (!subjectOk(r)) entry.reasons.push('subject does not reference the Patient of this bundle');
    if (r.resourceType === 'Observation') {
      const status = str(r.status) ?? '';
      if (!IMPORTED_OBSERVATION_STATUS.has(status)) {
        entry.status = 'skipped';
        entry.reasons.push(`status "${status}" is not imported (only final, amended, corrected)`);
        continue;
      }
      const coding = arr(obj(r.code)?.coding)
        .map(obj)
        .filter((c): c is Json => !!c);
      const loinc = coding.filter((c) => c.system === LOINC_SYSTEM).map((c) => str(c.code) ?? '');
      const mapped = loinc.map((c) => LOINC_MAP[c]).find(Boolean);
      if (!mapped) {
        const codes = coding.map((c) => `${str(c.system) ?? '?'}|${str(c.code) ?? '?'}`);
        codes.forEach((c) => unknownCodes.add(c));
        entry.reasons.push(`unknown code ${codes.join(', ') || '(none)'}`);
        entry.status = 'refused';
        continue;
      }
      const time = effectiveTime(r);
      if (!time) entry.reasons.push('no effective[x] time (issued is not the sample time)');
      const q = quantity(obj(r.valueQuantity));
      if (!q) entry.reasons.push('no valueQuantity with a UCUM code');
      if (entry.reasons.length || !time || !q) {
        entry.status = 'refused';
        continue;
      }
      if (mapped.target === 'covariate') {
        entry.target = 'covariate';
        let { value, code } = q;
        if (mapped.kind === 'height' && code === 'm') [value, code] = [value * 100, 'cm'];
        if (mapped.kind === 'height' && code === '[in_i]') [value, code] = [value * 2.54, 'cm'];
        plan.covariates.push({
          entry,
          input: {
            kind: mapped.kind,
            value,
            unit: code,
            observedAt: time,
            weightSource: mapped.kind === 'weight' ? 'measured' : undefined,
          },
        });
      } else {
        entry.target = 'level';
        if (!['mg/L', 'ug/mL', 'umol/L'].includes(q.code)) {
          entry.reasons.push(`unknown unit "${q.code}" for a drug level`);
          entry.status = 'refused';
          continue;
        }
        plan.levels.push({
          entry,
          drug: mapped.drug,
          input: {
            value: q.value,
            unit: q.code as LevelInput['unit'],
            collectedAt: time,
            sampleKind: mapped.sampleKind,
            fraction: mapped.fraction,
            loincCode: loinc.find((c) => LOINC_MAP[c]) ?? null,
          },
        });
      }
    } else if (r.resourceType === 'MedicationAdministration') {
      entry.target = 'dose';
      const status = str(r.status) ?? '';
      if (status === 'entered-in-error') {
        entry.status = 'skipped';
        entry.reasons.push('status entered-in-error is not imported');
        continue;
      }
      const adminStatus =
        status === 'completed'
          ? 'given'
          : status === 'not-done'
            ? 'missed'
            : status === 'stopped'
              ? 'partial'
              : null;
      if (!adminStatus)
        entry.reasons.push(
          `status "${status}" cannot be imported (completed, not-done or stopped)`,
        );
      const drug = drugOf(obj(r.medicationCodeableConcept));
      if (!drug) {
        const concept = obj(r.medicationCodeableConcept);
        const codes = arr(concept?.coding).map(
          (c) => `${str(obj(c)?.system) ?? '?'}|${str(obj(c)?.code) ?? '?'}`,
        );
        codes.forEach((c) => unknownCodes.add(c));
        entry.reasons.push(
          `unknown medication ${codes.join(', ') || str(concept?.text) || '(none)'}`,
        );
      }
      const dosage = obj(r.dosage);
      const dose = quantity(obj(dosage?.dose));
      if (!dose || (dose.code !== 'mg' && dose.code !== 'g'))
        entry.reasons.push('dosage.dose must be a quantity in mg or g');
      const period = obj(r.effectivePeriod);
      const start = str(period?.start) ?? str(r.effectiveDateTime);
      const end = str(period?.end);
      if (!start || Number.isNaN(Date.parse(start)))
        entry.reasons.push('no effectivePeriod.start or effectiveDateTime');
      let rateMgPerH: number | undefined;
      const rq = quantity(obj(dosage?.rateQuantity));
      if (rq?.code === 'mg/h') rateMgPerH = rq.value;
      const ratio = obj(dosage?.rateRatio);
      if (ratio) {
        const n = quantity(obj(ratio.numerator));
        const d = quantity(obj(ratio.denominator));
        if (n && d && (n.code === 'mg' || n.code === 'g') && (d.code === 'h' || d.code === 'min')) {
          rateMgPerH =
            ((n.code === 'g' ? 1000 : 1) * n.value) / (d.code === 'min' ? d.value / 60 : d.value);
        } else entry.reasons.push('dosage.rateRatio must be mg (or g) per h (or min)');
      }
      if (rq && rq.code !== 'mg/h')
        entry.reasons.push(`dosage.rateQuantity unit "${rq.code}" is not mg/h`);
      if (entry.reasons.length || !dose || !start || !drug || !adminStatus) {
        entry.status = 'refused';
        continue;
      }
      const amountMg = dose.code === 'g' ? dose.value * 1000 : dose.value;
      let minutes: number | undefined;
      if (end) minutes = (Date.parse(end) - Date.parse(start)) / 60_000;
      if (rateMgPerH !== undefined) {
        const fromRate = (amountMg / rateMgPerH) * 60;
        if (minutes !== undefined && Math.abs(fromRate - minutes) > 0.1 * minutes) {
          entry.reasons.push(
            `dosage.rate (${rateMgPerH} mg/h, ${Math.round(fromRate)} min) disagrees with effectivePeriod (${Math.round(minutes)} min)`,
          );
          entry.status = 'refused';
          continue;
        }
        minutes ??= fromRate;
      }
      const routeText = JSON.stringify(dosage?.route ?? '').toLowerCase();
      const route =
        minutes !== undefined ? 'iv-infusion' : routeText.includes('oral') ? 'oral' : 'iv-bolus';
      plan.doses.push({
        entry,
        drug,
        input: {
          amount: dose.value,
          unit: dose.code as 'mg' | 'g',
          route,
          startAt: new Date(start).toISOString(),
          infusionMinutes: route === 'iv-infusion' ? minutes : undefined,
          administrationStatus: adminStatus,
        },
      });
    } else {
      entry.status = 'skipped';
      entry.reasons.push(`${String(r.resourceType)} resources are not imported`);
    }
  }

  // 3. Course for drug rows.
  const drugs = new Set([...plan.doses.map((d) => d.drug), ...plan.levels.map((l) => l.drug)]);
  if (!course && drugs.size > 0) {
    if (drugs.size > 1) {
      for (const x of [...plan.doses, ...plan.levels])
        refuse(x.entry, 'the bundle mixes drugs: import each course with its courseId');
    } else if (plan.patient) {
      const drug = [...drugs][0] as Drug;
      const found = await listCourses(db, actor, {
        patientId: plan.patient.id,
        drug,
        status: 'active',
        page: 1,
        pageSize: 2,
        sort: 'createdAt',
        order: 'desc',
      });
      if (found.items.length === 1)
        course = await requireCourse(db, actor, (found.items[0] as { id: string }).id);
      else
        for (const x of [...plan.doses, ...plan.levels])
          refuse(
            x.entry,
            found.items.length
              ? `more than one active ${drug} course: give courseId`
              : `no active ${drug} course for this patient: create one first`,
          );
    } else {
      for (const x of [...plan.doses, ...plan.levels])
        refuse(
          x.entry,
          'a new patient has no course yet: import the patient first, then the doses and levels into a course',
        );
    }
  }
  if (course) {
    for (const x of [...plan.doses, ...plan.levels]) {
      if (x.drug !== course.course.drug)
        refuse(x.entry, `${x.drug} does not belong to this ${course.course.drug} course`);
    }
  }

  // 4. Plausibility checks, the same as typed entry.
  const patientForChecks: PatientRecord | null =
    plan.patient ??
    (plan.newPatient
      ? {
          id: '00000000-0000-0000-0000-000000000000',
          version: 1,
          isTeaching: false,
          mrn: plan.newPatient.mrn,
          givenName: plan.newPatient.given,
          familyName: plan.newPatient.family,
          birthDate: plan.newPatient.birthDate,
          teachingLabel: null,
          ageYears: null,
          sex: plan.newPatient.sex,
          ward: null,
          createdBy: null,
          createdAt: now.toISOString(),
          updatedAt: now.toISOString(),
        }
      : null);
  const existingCovs = plan.patient ? await covariatesOfPatient(db, plan.patient.id) : [];
  const seenCov = new Set(existingCovs.map((c) => `${c.kind}|${c.observedAt}`));
  for (const c of plan.covariates) {
    if (c.entry.status !== 'accepted') continue;
    if (!patientForChecks) {
      refuse(c.entry, 'no patient to attach it to');
      continue;
    }
    const check = checkCovariateInput(patientForChecks, c.input, now, 'fhir');
    if (!check.ok)
      for (const [f, ms] of Object.entries(check.errors))
        for (const m of ms) refuse(c.entry, `${f}: ${m}`);
    else {
      c.entry.echo = check.echo;
      const key = `${c.input.kind}|${c.input.observedAt}`;
      if (seenCov.has(key)) refuse(c.entry, 'already recorded at that time (duplicate)');
      seenCov.add(key);
    }
  }
  let acceptedDoses: Array<{ entry: Entry; columns: ReturnType<typeof doseColumns> }> = [];
  let acceptedLevels: Array<{ entry: Entry; columns: ReturnType<typeof levelColumns> }> = [];
  if (course) {
    const ctx = course;
    const existingDoses = await dosesOfCourse(db, ctx.course.id);
    const liveDoses = plan.doses.filter((d) => d.entry.status === 'accepted');
    const doseChecks = checkDoseBatch(
      ctx,
      existingDoses,
      liveDoses.map((d) => d.input),
      now,
    );
    const newInfusions: DoseRecord[] = [];
    liveDoses.forEach((d, i) => {
      const c = doseChecks[i];
      if (!c) return;
      if (!c.ok)
        for (const [f, ms] of Object.entries(c.errors))
          for (const m of ms) refuse(d.entry, `${f}: ${m}`);
      else {
        d.entry.echo = c.dose.echo;
        const columns = doseColumns(ctx, c.dose, 'fhir', actor.userId);
        acceptedDoses.push({ entry: d.entry, columns });
        newInfusions.push({
          route: c.dose.route,
          durationH: c.dose.durationH,
          administrationStatus: c.dose.administrationStatus,
          startAt: c.dose.start.at,
          startHour: null,
        } as DoseRecord);
      }
    });
    const infusions = infusionsOf([...existingDoses, ...newInfusions]);
    const liveLevels = plan.levels.filter((l) => l.entry.status === 'accepted');
    const levelChecks = checkLevelBatch(
      ctx,
      infusions,
      await levelsOfCourse(db, ctx.course.id),
      liveLevels.map((l) => l.input),
      now,
    );
    liveLevels.forEach((l, i) => {
      const c = levelChecks[i];
      if (!c) return;
      if (!c.ok)
        for (const [f, ms] of Object.entries(c.errors))
          for (const m of ms) refuse(l.entry, `${f}: ${m}`);
      else {
        l.entry.echo = c.level.echo;
        acceptedLevels.push({
          entry: l.entry,
          columns: levelColumns(ctx, c.level, 'fhir', actor.userId),
        });
      }
    });
    acceptedDoses = acceptedDoses.filter((d) => d.entry.status === 'accepted');
    acceptedLevels = acceptedLevels.filter((d) => d.entry.status === 'accepted');
  }

  const refusedCount = entries.filter((e) => e.status === 'refused').length;
  const response: FhirImportResponse = {
    patientId: plan.patient?.id ?? null,
    patientCreated: false,
    courseId: course?.course.id ?? null,
    entries,
    acceptedCount: entries.filter((e) => e.status === 'accepted').length,
    refusedCount,
    unknownCodes: [...unknownCodes],
    committed: false,
  };
  if (request.mode === 'preview') return response;
  if (refusedCount > 0) {
    throw new AppError(
      'import-refused',
      `Nothing was imported: ${refusedCount} resource(s) were refused (see each entry's reasons).`,
      400,
      { preview: response },
    );
  }
  return inTransaction(db, async (trx) => {
    let patientId = plan.patient?.id ?? null;
    const audit = (action: string, entityType: string, entityId: string, after: unknown) =>
      recordAudit(trx, {
        actor: auditActor(actor),
        action,
        entityType,
        entityId,
        after,
        context: { import: 'fhir' },
      });
    if (!patientId && plan.newPatient) {
      const np = plan.newPatient;
      const created = await insertPatient(trx, {
        is_teaching: false,
        mrn: np.mrn,
        family_name: np.family,
        given_name: np.given,
        birth_date: np.birthDate,
        sex: np.sex,
        created_by: actor.userId,
      });
      patientId = created.id;
      await audit('patient.create', 'patient', created.id, created);
    }
    for (const c of plan.covariates) {
      if (!patientId || !patientForChecks) break;
      const check = checkCovariateInput(
        { ...patientForChecks, id: patientId },
        c.input,
        now,
        'fhir',
      );
      if (!check.ok)
        throw new AppError('import-failed', `${c.entry.resource} was refused on commit`, 400);
      const created = await insertCovariate(trx, { ...check.columns, created_by: actor.userId });
      await audit('covariate.create', 'covariate', created.id, created);
    }
    for (const d of acceptedDoses) {
      const [created] = await insertDoses(trx, [d.columns]);
      if (created) await audit('dose.create', 'dose', created.id, created);
    }
    for (const l of acceptedLevels) {
      const [created] = await insertLevels(trx, [l.columns]);
      if (created) await audit('level.create', 'level', created.id, created);
    }
    await recordAudit(trx, {
      actor: auditActor(actor),
      action: 'import.fhir',
      entityType: 'patient',
      entityId: patientId ?? undefined,
      context: { entries: entries.length, courseId: course?.course.id ?? null },
    });
    return {
      ...response,
      patientId,
      patientCreated: !plan.patient && !!plan.newPatient,
      committed: true,
    };
  });
}

function refuse(entry: Entry, reason: string): void {
  entry.reasons.push(reason);
  entry.status = 'refused';
}
