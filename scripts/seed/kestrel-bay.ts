/**
 * The Kestrel Bay demo scenario (invented): patients across 4 North, ICU, Renal unit and
 * Paediatrics with vancomycin (one obese, one on intermittent haemodialysis), gentamicin,
 * tobramycin and phenytoin courses; dose histories with a late and a missed dose; levels generated
 * from the library models with seeded between-patient and residual noise (including one drawn
 * during an infusion and one early trough); plus three synthetic teaching patients in relative time.
 * Times are relative to the seed run's "now", so the caseload looks current. Idempotent: a patient
 * whose MRN (or teaching label) exists is left alone.
 */
import {
  bsaMosteller,
  cockcroftGault,
  creatinineMgDlFromUmolL,
  drugModelLibrary,
  egfrBedsideSchwartz,
  individualParameters,
  mulberry32,
  simulate,
  type Dose,
  type DrugModelEntry,
  type PkParameters,
} from '../../packages/kinetics/src/index';
import type { Drug, DoseRoute, Role, SampleKind, Target } from '../../packages/contracts/src/index';
import { loadConfig } from '../../apps/api/src/config';
import { recordAudit } from '../../apps/api/src/data-access/audit';
import { inTransaction, type Conn } from '../../apps/api/src/data-access/casework-db';
import { insertCourse } from '../../apps/api/src/data-access/courses-repo';
import { insertCovariate } from '../../apps/api/src/data-access/covariates-repo';
import { createDb } from '../../apps/api/src/data-access/db';
import { insertDoses } from '../../apps/api/src/data-access/doses-repo';
import { findDrugModel } from '../../apps/api/src/data-access/drug-models-repo';
import { insertLevels } from '../../apps/api/src/data-access/levels-repo';
import { findUserBySubject, insertUser } from '../../apps/api/src/data-access/users';
import { checkCovariate } from '../../apps/api/src/domain/covariates/units';
import { checkDose } from '../../apps/api/src/domain/doses/checks';
import { syncEngineLibrary } from '../../apps/api/src/domain/drug-models/drug-models';
import { checkLevel, UMOL_PER_MG } from '../../apps/api/src/domain/levels/checks';

/** Demo staff subjects as configured in apps/idp/accounts.dev.json. */
const DEMO_PHARMACIST = {
  subject: 'kb-0001',
  displayName: 'Maren Okafor',
  email: 'maren.okafor@kestrelbay.example',
  role: 'pharmacist' as const,
};
const DEMO_REVIEWER = {
  subject: 'kb-0002',
  displayName: 'Tomasz Lindqvist',
  email: 'tomasz.lindqvist@kestrelbay.example',
  role: 'reviewer' as const,
};

interface DoseSpec {
  /** Hours before now (real) or hours from the first dose (teaching). */
  h: number;
  mg: number;
  route?: DoseRoute;
  minutes?: number;
  status?: 'given' | 'missed' | 'partial';
  note?: string;
}
interface LevelSpec {
  h: number;
  kind: SampleKind;
  unit?: 'mg/L' | 'umol/L';
  note?: string;
}
interface PatientSpec {
  mrn?: string;
  label?: string;
  given?: string;
  family?: string;
  sex: 'female' | 'male';
  ageYears: number;
  ward: string;
  weightKg: number;
  heightCm: number;
  scrUmolL: number;
  albuminGL?: number;
  dialysis?: 'intermittent-haemodialysis';
  drug: Drug;
  modelId: string;
  indication: string;
  micMgL: number | null;
  target: Target;
  owner: 'pharmacist' | 'reviewer';
  doses: DoseSpec[];
  levels: LevelSpec[];
  seed: number;
}

const VANCO = 'vancomycin-adult-goti-2018';
const GENT = 'gentamicin-adult-extended-interval';
const TOBRA = 'tobramycin-adult-extended-interval';
const PHT = 'phenytoin-adult-grasela-1983';
const auc = { metric: 'auc24', low: 400, high: 600 } as const;

const REAL: PatientSpec[] = [
  {
    mrn: 'KB-100417',
    given: 'Rowan',
    family: 'Mistry-Calder',
    sex: 'male',
    ageYears: 67,
    ward: '4 North',
    weightKg: 78,
    heightCm: 176,
    scrUmolL: 104,
    drug: 'vancomycin',
    modelId: VANCO,
    indication: 'MRSA cellulitis of the lower leg',
    micMgL: 1,
    target: auc,
    owner: 'pharmacist',
    seed: 11,
    // q12h from 58 h ago; the dose due 22 h ago was given 2.5 h late; the dose due 10 h ago was missed.
    doses: [
      ...[58, 46, 34].map((h) => ({ h, mg: 1250, minutes: 90 })),
      { h: 19.5, mg: 1250, minutes: 90, note: 'given 2.5 h late (patient in radiology)' },
      { h: 10, mg: 1250, minutes: 90, status: 'missed' as const, note: 'missed: IV access lost' },
    ],
    // An early trough: drawn 5 h after the end of the late dose, 3 h before the next dose was due.
    levels: [
      { h: 13, kind: 'trough', note: 'labelled trough; drawn early with the morning bloods' },
      { h: 31.5, kind: 'peak' },
    ],
  },
  {
    mrn: 'KB-100582',
    given: 'Odette',
    family: 'Varga',
    sex: 'female',
    ageYears: 45,
    ward: '4 North',
    weightKg: 148,
    heightCm: 165,
    scrUmolL: 71,
    drug: 'vancomycin',
    modelId: VANCO,
    indication: 'Infected sacral pressure injury; obese (BMI 54)',
    micMgL: 1,
    target: auc,
    owner: 'pharmacist',
    seed: 12,
    doses: [
      { h: 30, mg: 2500, minutes: 150, note: 'loading dose' },
      { h: 18, mg: 1750, minutes: 120 },
      { h: 6, mg: 1750, minutes: 120 },
    ],
    // One level drawn during the infusion (kept, flagged) and a trough before the 3rd dose.
    levels: [
      { h: 18.3, kind: 'trough' },
      { h: 5, kind: 'during-infusion', note: 'drawn from the other arm during the infusion' },
    ],
  },
  {
    mrn: 'KB-100733',
    given: 'Tevita',
    family: 'Lautaimi',
    sex: 'male',
    ageYears: 58,
    ward: 'Renal unit',
    weightKg: 72,
    heightCm: 171,
    scrUmolL: 618,
    dialysis: 'intermittent-haemodialysis',
    drug: 'vancomycin',
    modelId: VANCO,
    indication: 'Tunnelled dialysis-catheter infection (MRSA)',
    micMgL: 1,
    target: { metric: 'trough', low: 15, high: 20 },
    owner: 'pharmacist',
    seed: 13,
    doses: [
      { h: 70, mg: 1500, minutes: 90, note: 'loading dose after haemodialysis' },
      { h: 22, mg: 750, minutes: 60, note: 'post-haemodialysis' },
    ],
    levels: [{ h: 24, kind: 'pre-dialysis' }],
  },
  {
    mrn: 'KB-100861',
    given: 'Ingrid',
    family: 'Sotomayor',
    sex: 'female',
    ageYears: 52,
    ward: 'ICU',
    weightKg: 70,
    heightCm: 168,
    scrUmolL: 88,
    drug: 'gentamicin',
    modelId: GENT,
    indication: 'Urosepsis, extended-interval dosing',
    micMgL: 1,
    target: { metric: 'peak-mic-ratio', low: 10, high: null },
    owner: 'reviewer',
    seed: 14,
    doses: [
      { h: 33, mg: 490, minutes: 30 },
      { h: 9, mg: 490, minutes: 30 },
    ],
    levels: [{ h: 1, kind: 'random', note: '8 h after the start of the infusion' }],
  },
  {
    mrn: 'KB-100905',
    given: 'Kai',
    family: 'Oyelaran',
    sex: 'male',
    ageYears: 16,
    ward: 'Paediatrics',
    weightKg: 52,
    heightCm: 168,
    scrUmolL: 62,
    drug: 'tobramycin',
    modelId: TOBRA,
    indication: 'Cystic fibrosis pulmonary exacerbation',
    micMgL: 1,
    target: { metric: 'peak', low: 20, high: 30 },
    owner: 'pharmacist',
    seed: 15,
    doses: [
      { h: 26, mg: 520, minutes: 30 },
      { h: 2, mg: 520, minutes: 30 },
    ],
    levels: [{ h: 25, kind: 'peak' }],
  },
  {
    mrn: 'KB-101044',
    given: 'Beatrix',
    family: 'Nakashima',
    sex: 'female',
    ageYears: 71,
    ward: '4 North',
    weightKg: 64,
    heightCm: 160,
    scrUmolL: 80,
    albuminGL: 28,
    drug: 'phenytoin',
    modelId: PHT,
    indication: 'Post-operative seizure prophylaxis',
    micMgL: null,
    target: { metric: 'trough', low: 10, high: 20 },
    owner: 'pharmacist',
    seed: 16,
    doses: [
      { h: 100, mg: 1300, minutes: 30, note: 'IV loading dose' },
      ...[76, 52, 28, 4].map((h) => ({ h, mg: 300, route: 'oral' as const })),
    ],
    levels: [{ h: 3.5, kind: 'trough', unit: 'umol/L' }],
  },
  {
    mrn: 'KB-101172',
    given: 'Hamish',
    family: 'Ekwueme',
    sex: 'male',
    ageYears: 39,
    ward: 'ICU',
    weightKg: 92,
    heightCm: 185,
    scrUmolL: 76,
    drug: 'vancomycin',
    modelId: VANCO,
    indication: 'Ventilator-associated pneumonia',
    micMgL: 1,
    target: auc,
    owner: 'reviewer',
    seed: 17,
    doses: [44, 36, 28, 20, 12].map((h) => ({ h, mg: 1500, minutes: 90 })),
    levels: [],
  },
];

const TEACHING: PatientSpec[] = [
  {
    label: 'Practice case: vancomycin, first levels',
    sex: 'male',
    ageYears: 63,
    ward: '4 North',
    weightKg: 84,
    heightCm: 178,
    scrUmolL: 97,
    drug: 'vancomycin',
    modelId: VANCO,
    indication: 'Septic arthritis of the knee',
    micMgL: 1,
    target: auc,
    owner: 'pharmacist',
    seed: 21,
    doses: [0, 12, 24, 36].map((h) => ({ h, mg: 1250, minutes: 90 })),
    levels: [
      { h: 37.5 + 1, kind: 'peak' },
      { h: 47.5, kind: 'trough' },
    ],
  },
  {
    label: 'Practice case: gentamicin once daily',
    sex: 'female',
    ageYears: 48,
    ward: 'ICU',
    weightKg: 66,
    heightCm: 163,
    scrUmolL: 70,
    drug: 'gentamicin',
    modelId: GENT,
    indication: 'Pyelonephritis',
    micMgL: 1,
    target: { metric: 'peak-mic-ratio', low: 10, high: null },
    owner: 'pharmacist',
    seed: 22,
    doses: [{ h: 0, mg: 460, minutes: 30 }],
    levels: [
      { h: 6, kind: 'random' },
      { h: 14, kind: 'random' },
    ],
  },
  {
    label: 'Practice case: phenytoin maintenance',
    sex: 'male',
    ageYears: 55,
    ward: '4 North',
    weightKg: 75,
    heightCm: 175,
    scrUmolL: 85,
    albuminGL: 35,
    drug: 'phenytoin',
    modelId: PHT,
    indication: 'Focal epilepsy',
    micMgL: null,
    target: { metric: 'trough', low: 10, high: 20 },
    owner: 'pharmacist',
    seed: 23,
    doses: [0, 24, 48, 72, 96].map((h) => ({ h, mg: 300, route: 'oral' as const })),
    levels: [{ h: 119, kind: 'trough' }],
  },
];

/** Standard normal from a uniform PRNG (Box-Muller). */
function normal(rand: () => number): number {
  const u = Math.max(rand(), 1e-12);
  return Math.sqrt(-2 * Math.log(u)) * Math.cos(2 * Math.PI * rand());
}

function crclFor(p: PatientSpec): number {
  const scrMgDl = creatinineMgDlFromUmolL(p.scrUmolL);
  if (p.ageYears >= 18)
    return cockcroftGault({
      ageYears: p.ageYears,
      sex: p.sex,
      weightKg: p.weightKg,
      serumCreatinineMgDl: scrMgDl,
    });
  // Children: bedside Schwartz eGFR de-normalised by BSA, used only to generate the demo levels.
  return (
    (egfrBedsideSchwartz({ heightCm: p.heightCm, serumCreatinineMgDl: scrMgDl }) *
      bsaMosteller(p.heightCm, p.weightKg)) /
    1.73
  );
}

/** The patient's "true" parameters: covariate model × log-normal deviation drawn from the model's variability. */
function trueParameters(entry: DrugModelEntry, p: PatientSpec, rand: () => number) {
  const covs: Record<string, number> = { CRCL: crclFor(p), WT: p.weightKg, HD: p.dialysis ? 1 : 0 };
  const { parameters } = individualParameters(entry, covs);
  const out: Record<string, number> = { ...(parameters as unknown as Record<string, number>) };
  for (const [name, v] of Object.entries(entry.variability)) {
    const omega =
      v?.omega ??
      (v?.cvPercent !== undefined ? Math.sqrt(Math.log(1 + (v.cvPercent / 100) ** 2)) : 0);
    if (out[name] !== undefined)
      out[name] = (out[name] as number) * Math.exp(0.7 * omega * normal(rand));
  }
  return out;
}

async function ensureUser(
  db: Conn,
  issuer: string,
  u: { subject: string; displayName: string; email: string; role: Role },
): Promise<string> {
  const found = await findUserBySubject(db, issuer, u.subject);
  if (found) return found.id;
  return (
    await insertUser(db, {
      issuer,
      subject: u.subject,
      displayName: u.displayName,
      email: u.email,
      role: u.role,
    })
  ).id;
}

async function seedPatient(
  db: Conn,
  p: PatientSpec,
  teaching: boolean,
  owners: Record<'pharmacist' | 'reviewer', string>,
  now: Date,
): Promise<boolean> {
  const exists = teaching
    ? await db('patients').where({ teaching_label: p.label }).first()
    : await db('patients').where({ mrn: p.mrn }).first();
  if (exists) return false;
  const entry = drugModelLibrary[p.modelId] as DrugModelEntry;
  const model = await findDrugModel(db, p.modelId, 1);
  if (!model) throw new Error(`drug model ${p.modelId} missing`);
  const rand = mulberry32(p.seed);
  const time = (h: number) =>
    teaching
      ? { at: null, hour: h }
      : { at: new Date(now.getTime() - h * 3_600_000).toISOString(), hour: null };
  // Engine timeline: hours from the first dose.
  const t0 = teaching ? 0 : Math.max(...p.doses.map((d) => d.h));
  const engineTime = (h: number) => (teaching ? h : t0 - h);
  const salt = entry.practical.saltFactor ?? 1;
  const params = trueParameters(entry, p, rand);
  const engineDoses: Dose[] = p.doses
    .filter((d) => d.status !== 'missed')
    .map((d) => {
      const route = d.route ?? 'iv-infusion';
      const t = engineTime(d.h);
      if (route === 'iv-infusion')
        return {
          time: t,
          amount: d.mg * salt,
          route: 'infusion',
          duration: (d.minutes ?? 60) / 60,
        };
      return { time: t, amount: d.mg * salt, route: route === 'iv-bolus' ? 'bolus' : 'oral' };
    });
  const levelTimes = p.levels.map((l) => engineTime(l.h));
  const sim = levelTimes.length
    ? simulate({
        model: entry.structure,
        parameters: params as unknown as PkParameters,
        doses: engineDoses,
        outputTimes: levelTimes,
      }).concentrations
    : [];
  const proportional = entry.residualError.proportional ?? 0.1;

  await inTransaction(db, async (trx) => {
    const birthYear = now.getUTCFullYear() - p.ageYears - 1;
    const [patient] = await trx('patients')
      .insert(
        teaching
          ? {
              is_teaching: true,
              teaching_label: p.label,
              age_years: p.ageYears,
              sex: p.sex,
              ward: p.ward,
            }
          : {
              is_teaching: false,
              mrn: p.mrn,
              given_name: p.given,
              family_name: p.family,
              birth_date: `${birthYear}-${String(((p.seed * 7) % 12) + 1).padStart(2, '0')}-${String(((p.seed * 5) % 27) + 1).padStart(2, '0')}`,
              sex: p.sex,
              ward: p.ward,
            },
      )
      .returning('*');
    const firstDoseH = Math.max(...p.doses.map((d) => d.h));
    const covAt = time(teaching ? -3 : firstDoseH + 3);
    const cov = async (
      kind: 'weight' | 'height' | 'serum-creatinine' | 'albumin',
      value: number,
      unit: string,
      at = covAt,
    ) => {
      const check = checkCovariate(kind, value, unit, p.ageYears);
      await insertCovariate(trx, {
        patient_id: patient.id,
        is_teaching: teaching,
        kind,
        value,
        unit,
        canonical_value: check.canonicalValue,
        weight_source: kind === 'weight' ? 'measured' : null,
        observed_at: at.at,
        observed_hour: at.hour,
        source: 'seed',
      });
    };
    await cov('weight', p.weightKg, 'kg');
    await cov('height', p.heightCm, 'cm');
    await cov('serum-creatinine', p.scrUmolL, 'umol/L');
    if (p.albuminGL) await cov('albumin', p.albuminGL, 'g/L');
    if (p.dialysis) {
      await insertCovariate(trx, {
        patient_id: patient.id,
        is_teaching: teaching,
        kind: 'dialysis',
        dialysis_status: p.dialysis,
        observed_at: covAt.at,
        observed_hour: covAt.hour,
        source: 'seed',
      });
    }
    const course = await insertCourse(trx, {
      patient_id: patient.id,
      is_teaching: teaching,
      drug: p.drug,
      model_id: model.id,
      model_version: model.version,
      indication: p.indication,
      mic_mg_l: p.micMgL,
      mic_method: p.micMgL ? 'broth microdilution' : null,
      target_metric: p.target.metric,
      target_low: p.target.low,
      target_high: p.target.high,
      status: 'active',
      owner_user_id: owners[p.owner],
      created_by: owners[p.owner],
    });
    const starts: Array<{ at: string | null; hour: number | null }> = [];
    const infusions: Array<{
      start: { at: string | null; hour: number | null };
      durationH: number;
    }> = [];
    for (const d of p.doses) {
      const route = d.route ?? 'iv-infusion';
      const check = checkDose(
        {
          amount: d.mg,
          unit: 'mg',
          route,
          ...(teaching ? { startHour: d.h } : { startAt: time(d.h).at as string }),
          infusionMinutes: route === 'iv-infusion' ? (d.minutes ?? 60) : undefined,
          administrationStatus: d.status ?? 'given',
          note: d.note,
        },
        {
          isTeaching: teaching,
          drug: p.drug,
          plausibleMg: model.plausibleSingleDoseMg,
          courseStart: null,
          now,
          existingStarts: starts,
        },
      );
      if (!check.ok)
        throw new Error(
          `seed dose for ${p.mrn ?? p.label} refused: ${JSON.stringify(check.errors)}`,
        );
      starts.push(check.dose.start);
      if (check.dose.durationH !== null && check.dose.administrationStatus !== 'missed')
        infusions.push({ start: check.dose.start, durationH: check.dose.durationH });
      await insertDoses(trx, [
        {
          course_id: course.id,
          is_teaching: teaching,
          amount: d.mg,
          unit: 'mg',
          amount_mg: d.mg,
          route,
          start_at: check.dose.start.at,
          start_hour: check.dose.start.hour,
          duration_h: check.dose.durationH,
          administration_status: check.dose.administrationStatus,
          note: d.note ?? null,
          source: 'seed',
        },
      ]);
    }
    const seen: Array<{
      time: { at: string | null; hour: number | null };
      fraction: 'total' | 'free';
    }> = [];
    for (const [i, l] of p.levels.entries()) {
      const trueC = sim[i] as number;
      const mgL = Math.max(0.2, trueC * Math.exp(proportional * normal(rand)));
      const unit = l.unit ?? 'mg/L';
      const value = Number((unit === 'umol/L' ? mgL * UMOL_PER_MG[p.drug] : mgL).toFixed(1));
      const check = checkLevel(
        {
          value,
          unit,
          ...(teaching ? { collectedHour: l.h } : { collectedAt: time(l.h).at as string }),
          sampleKind: l.kind,
          fraction: 'total',
          assayLowerLimit: 1,
          note: l.note,
        },
        { isTeaching: teaching, drug: p.drug, courseStart: null, now, infusions, existing: seen },
      );
      if (!check.ok)
        throw new Error(
          `seed level for ${p.mrn ?? p.label} refused: ${JSON.stringify(check.errors)}`,
        );
      seen.push({ time: check.level.collected, fraction: 'total' });
      await insertLevels(trx, [
        {
          course_id: course.id,
          is_teaching: teaching,
          value,
          unit,
          value_mg_l: check.level.valueMgL,
          collected_at: check.level.collected.at,
          collected_hour: check.level.collected.hour,
          sample_kind: l.kind,
          fraction: 'total',
          assay_lower_limit: 1,
          flags: check.level.flags,
          note: l.note ?? null,
          source: 'seed',
        },
      ]);
    }
    await recordAudit(trx, {
      actor: null,
      action: 'seed.patient',
      entityType: 'patient',
      entityId: patient.id,
      after: { mrn: p.mrn ?? null, label: p.label ?? null, courseId: course.id },
      context: { seed: 'kestrel-bay' },
    });
  });
  return true;
}

export const kestrelBaySeeder = {
  name: 'Kestrel Bay patients, courses, doses and levels',
  /** `databaseUrl` defaults to DATABASE_URL; returns how many patients were created. */
  async run(options: { databaseUrl?: string; now?: Date; quiet?: boolean } = {}): Promise<number> {
    const config = loadConfig(
      process.env,
      options.databaseUrl ? { databaseUrl: options.databaseUrl } : {},
    );
    const db = createDb(config.databaseUrl);
    try {
      await syncEngineLibrary(db, drugModelLibrary);
      const owners = {
        pharmacist: await ensureUser(db, config.oidcIssuer, DEMO_PHARMACIST),
        reviewer: await ensureUser(db, config.oidcIssuer, DEMO_REVIEWER),
      };
      const now = options.now ?? new Date();
      let created = 0;
      for (const p of REAL) if (await seedPatient(db, p, false, owners, now)) created++;
      for (const p of TEACHING) if (await seedPatient(db, p, true, owners, now)) created++;
      if (!options.quiet) {
        console.log(
          `Kestrel Bay: ${created} patient(s) created, ${REAL.length + TEACHING.length - created} already present`,
        );
      }
      return created;
    } finally {
      await db.destroy();
    }
  },
};
