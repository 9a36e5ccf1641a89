/**
 * Synthetic teaching cases (invented patients, relative time only), each with a hidden "true"
 * patient whose parameters generated the levels (with a little seeded noise), and most with a
 * deliberate pitfall: an early trough, a level drawn during the infusion, a stale weight, a unit
 * mix-up. Idempotent: a case whose title exists is left alone.
 */
import {
  cockcroftGault,
  creatinineMgDlFromUmolL,
  drugModelLibrary,
  gentamicinExtendedInterval,
  individualParameters,
  mulberry32,
  simulate,
  vancomycinGoti2018,
  type Dose,
  type DrugModelEntry,
} from '../../packages/kinetics/src/index';
import { createDb, type Db } from '../../apps/api/src/data-access/db';
import { syncEngineLibrary } from '../../apps/api/src/domain/drug-models/drug-models';
import {
  insertTeachingCase,
  teachingCaseByTitle,
  type NewTeachingCase,
} from '../../apps/api/src/data-access/teaching-repo';

interface Spec {
  title: string;
  summary: string;
  entry: DrugModelEntry;
  ageYears: number;
  sex: 'female' | 'male';
  /** The weight the patient really has (drives the true parameters). */
  trueWeightKg: number;
  /** The weight on the chart (differs in the stale-weight case). */
  chartWeight: { kg: number; hour: number };
  heightCm: number;
  scrUmolL: number;
  /** Multiplies the covariate-predicted clearance: the patient's own deviation. */
  clFactor: number;
  vFactor: number;
  doses: Array<{ hour: number; mg: number; durationH: number }>;
  levels: Array<{
    hour: number;
    kind: 'trough' | 'peak' | 'random' | 'during-infusion';
    /** Store the µmol/L number as if it were mg/L (the unit mix-up). */
    unitMixUp?: boolean;
    pitfallIndex?: number;
  }>;
  target: { metric: 'auc24' | 'peak' | 'trough'; low: number | null; high: number | null };
  micMgL: number | null;
  indication: string;
  pitfalls: Array<{ code: string; description: string }>;
  seed: number;
}

const VANCOMYCIN_UMOL_PER_MG = 0.69;

function every(hours: number, n: number, mg: number, durationH: number, from = 0) {
  return Array.from({ length: n }, (_, i) => ({ hour: from + i * hours, mg, durationH }));
}

const SPECS: Spec[] = [
  {
    title: 'Vancomycin, cellulitis: the trough that came early',
    summary:
      'Day 3 of vancomycin 12-hourly for cellulitis. The ward sent a "trough" with the morning bloods.',
    entry: vancomycinGoti2018,
    ageYears: 67,
    sex: 'male',
    trueWeightKg: 84,
    chartWeight: { kg: 84, hour: -2 },
    heightCm: 176,
    scrUmolL: 98,
    clFactor: 0.85,
    vFactor: 1.05,
    doses: every(12, 5, 1250, 1.5),
    levels: [
      { hour: 38.5, kind: 'peak' },
      { hour: 44, kind: 'trough', pitfallIndex: 0 },
    ],
    target: { metric: 'auc24', low: 400, high: 600 },
    micMgL: 1,
    indication: 'cellulitis',
    pitfalls: [
      {
        code: 'early-trough',
        description:
          'The "trough" was drawn 4 h before the next dose (with the morning bloods), so it reads higher than a true trough.',
      },
    ],
    seed: 11,
  },
  {
    title: 'Gentamicin, pyelonephritis: a peak taken too soon',
    summary:
      'Extended-interval gentamicin; a "peak" was drawn while the 30-minute infusion still ran.',
    entry: gentamicinExtendedInterval,
    ageYears: 45,
    sex: 'female',
    trueWeightKg: 68,
    chartWeight: { kg: 68, hour: -4 },
    heightCm: 165,
    scrUmolL: 72,
    clFactor: 1.1,
    vFactor: 0.95,
    doses: every(24, 2, 480, 0.5),
    levels: [
      { hour: 24.25, kind: 'during-infusion', pitfallIndex: 0 },
      { hour: 32, kind: 'random' },
    ],
    target: { metric: 'peak', low: 16, high: null },
    micMgL: 1,
    indication: 'pyelonephritis',
    pitfalls: [
      {
        code: 'level-during-infusion',
        description:
          'The first level was drawn 15 min into a 30-min infusion: it is neither a peak nor usable as one.',
      },
    ],
    seed: 23,
  },
  {
    title: 'Vancomycin, osteomyelitis: whose weight is it?',
    summary: 'Week two of vancomycin for vertebral osteomyelitis after a long admission.',
    entry: vancomycinGoti2018,
    ageYears: 58,
    sex: 'female',
    trueWeightKg: 71,
    chartWeight: { kg: 86, hour: -230 },
    heightCm: 163,
    scrUmolL: 84,
    clFactor: 0.95,
    vFactor: 1,
    doses: every(12, 6, 1500, 1.5),
    levels: [
      { hour: 61.5, kind: 'peak' },
      { hour: 71.5, kind: 'trough' },
    ],
    target: { metric: 'auc24', low: 400, high: 600 },
    micMgL: 1,
    indication: 'vertebral osteomyelitis',
    pitfalls: [
      {
        code: 'stale-weight',
        description:
          'The only weight on the chart is from admission, nearly ten days before; she has lost about 15 kg since.',
      },
    ],
    seed: 37,
  },
  {
    title: 'Vancomycin, pneumonia: a surprisingly low level',
    summary: 'Hospital-acquired pneumonia; the laboratory result looks low for the dose given.',
    entry: vancomycinGoti2018,
    ageYears: 93,
    sex: 'male',
    trueWeightKg: 66,
    chartWeight: { kg: 66, hour: -6 },
    heightCm: 170,
    scrUmolL: 110,
    clFactor: 0.9,
    vFactor: 1,
    doses: every(24, 3, 1250, 2),
    levels: [
      { hour: 51, kind: 'peak' },
      { hour: 71.5, kind: 'trough', unitMixUp: true, pitfallIndex: 0 },
    ],
    target: { metric: 'auc24', low: 400, high: 600 },
    micMgL: 1,
    indication: 'hospital-acquired pneumonia',
    pitfalls: [
      {
        code: 'unit-mix-up',
        description:
          'The trough was reported in µmol/L and typed in as mg/L: 1 mg/L of vancomycin is about 0.69 µmol/L, so the true level is higher.',
      },
    ],
    seed: 41,
  },
  {
    title: 'Vancomycin, line infection: a clean first fit',
    summary:
      'A straightforward course with a well-timed peak and trough, for a first Bayesian fit.',
    entry: vancomycinGoti2018,
    ageYears: 39,
    sex: 'female',
    trueWeightKg: 62,
    chartWeight: { kg: 62, hour: -1 },
    heightCm: 168,
    scrUmolL: 64,
    clFactor: 1.15,
    vFactor: 0.9,
    doses: every(12, 4, 1000, 1),
    levels: [
      { hour: 38, kind: 'peak' },
      { hour: 47.5, kind: 'trough' },
    ],
    target: { metric: 'auc24', low: 400, high: 600 },
    micMgL: 1,
    indication: 'central line infection',
    pitfalls: [],
    seed: 53,
  },
];

/** Builds the case rows of a spec: true parameters from the real weight, levels simulated with noise. */
export function buildTeachingCase(spec: Spec, createdBy: string | null = null): NewTeachingCase {
  const crcl = cockcroftGault({
    ageYears: Math.min(spec.ageYears, 120),
    sex: spec.sex,
    weightKg: spec.trueWeightKg,
    serumCreatinineMgDl: creatinineMgDlFromUmolL(spec.scrUmolL),
  });
  const covariateValues: Record<string, number> = { WT: spec.trueWeightKg, CRCL: crcl, HD: 0 };
  const typical = individualParameters(spec.entry, covariateValues).parameters as unknown as Record<
    string,
    number
  >;
  const parameters: Record<string, number> = { ...typical };
  if (parameters.CL !== undefined)
    parameters.CL = Number((parameters.CL * spec.clFactor).toFixed(3));
  if (parameters.V1 !== undefined)
    parameters.V1 = Number((parameters.V1 * spec.vFactor).toFixed(3));
  const doses: Dose[] = spec.doses.map((d) => ({
    time: d.hour,
    amount: d.mg,
    route: 'infusion',
    duration: d.durationH,
  }));
  const sim = simulate({
    model: spec.entry.structure,
    parameters: parameters as never,
    doses,
    outputTimes: spec.levels.map((l) => l.hour),
    options: { estimateError: false },
  });
  const random = mulberry32(spec.seed);
  const levels = spec.levels.map((l, i) => {
    const noise = Math.exp((random() - 0.5) * 0.12);
    const mgL = Number((sim.concentrations[i]! * noise).toFixed(1));
    const stored = l.unitMixUp ? Number((mgL * VANCOMYCIN_UMOL_PER_MG).toFixed(1)) : mgL;
    return {
      value: stored,
      unit: 'mg/L',
      valueMgL: stored,
      sampleKind: l.kind,
      hour: l.hour,
      ...(l.pitfallIndex !== undefined ? { pitfallIndex: l.pitfallIndex } : {}),
    };
  });
  return {
    label: `Teaching case ${spec.seed}`,
    ageYears: Math.min(90, spec.ageYears),
    sex: spec.sex,
    drug: spec.entry.drug,
    modelId: spec.entry.id,
    modelVersion: 1,
    indication: spec.indication,
    micMgL: spec.micMgL,
    micMethod: spec.micMgL ? 'broth microdilution' : null,
    target: spec.target,
    covariates: [
      {
        kind: 'weight',
        value: spec.chartWeight.kg,
        unit: 'kg',
        canonicalValue: spec.chartWeight.kg,
        weightSource: 'measured',
        hour: spec.chartWeight.hour,
      },
      { kind: 'height', value: spec.heightCm, unit: 'cm', canonicalValue: spec.heightCm, hour: -2 },
      {
        kind: 'serum-creatinine',
        value: spec.scrUmolL,
        unit: 'umol/L',
        canonicalValue: spec.scrUmolL,
        hour: -3,
      },
    ],
    doses: spec.doses.map((d) => ({
      amountMg: d.mg,
      route: 'iv-infusion',
      durationH: d.durationH,
      status: 'given',
      hour: d.hour,
    })),
    levels,
    title: spec.title,
    summary: spec.summary,
    firstDoseClockH: 8,
    pitfalls: spec.pitfalls,
    trueParameters: {
      structure: spec.entry.structure as NewTeachingCase['trueParameters']['structure'],
      parameters,
    },
    origin: 'synthetic',
    createdBy,
  };
}

export const teachingSpecs: readonly Spec[] = SPECS;

/** Inserts every synthetic case not yet present. Returns the ids of all of them. */
export async function seedTeachingCases(db: Db): Promise<string[]> {
  await syncEngineLibrary(db, drugModelLibrary);
  const ids: string[] = [];
  for (const spec of SPECS) {
    const existing = await teachingCaseByTitle(db, spec.title);
    if (existing) {
      ids.push(existing);
      continue;
    }
    ids.push(await db.transaction((trx) => insertTeachingCase(trx, buildTeachingCase(spec))));
  }
  return ids;
}

/** The seeder entry of scripts/seed.ts. */
export const teachingCasesSeeder = {
  name: 'teaching cases',
  run: async () => {
    if (!process.env.DATABASE_URL) throw new Error('DATABASE_URL is not set');
    const db = createDb(process.env.DATABASE_URL);
    try {
      await seedTeachingCases(db);
    } finally {
      await db.destroy();
    }
  },
};
