import type { Drug, LevelUnit, SampleKind } from '@ebbtide/contracts';
import { fmt } from '../patients/common';
import { isInFuture, resolveTime, showTime, toHours, type ClinicalTime } from '../doses/timing';

/**
 * mg/L -> umol/L factors. Source: ASHP SI conversion appendix (vancomycin 0.69, gentamicin 2.09,
 * amikacin 1.708, phenytoin 3.964). Tobramycin 2.139 is derived from its molar mass, 467.5 g/mol
 * (1000 / 467.5), not from a published table.
 */
export const UMOL_PER_MG: Record<Drug, number> = {
  vancomycin: 0.69,
  gentamicin: 2.09,
  tobramycin: 2.139,
  amikacin: 1.708,
  phenytoin: 3.964,
};

/**
 * Upper bound of a plausible measured level in mg/L, above which the value is refused as a likely
 * unit or data-entry error (practice; well above any toxic level reported for these assays).
 */
export const PLAUSIBLE_MAX_MG_L: Record<Drug, number> = {
  vancomycin: 150,
  gentamicin: 60,
  tobramycin: 60,
  amikacin: 200,
  phenytoin: 100,
};

export function toMgL(value: number, unit: LevelUnit, drug: Drug): number {
  return unit === 'umol/L' ? value / UMOL_PER_MG[drug] : value;
}

export function levelEcho(value: number, unit: LevelUnit, drug: Drug): string {
  if (unit === 'umol/L') return `${fmt(value)} µmol/L (${fmt(value / UMOL_PER_MG[drug], 4)} mg/L)`;
  const label = unit === 'ug/mL' ? 'µg/mL' : 'mg/L';
  return `${fmt(value)} ${label} (${fmt(value * UMOL_PER_MG[drug], 4)} µmol/L)`;
}

export interface LevelInput {
  value: number;
  unit: LevelUnit;
  collectedAt?: string;
  collectedHour?: number;
  sampleKind: SampleKind;
  fraction: 'total' | 'free';
  assayLowerLimit?: number | null;
  loincCode?: string | null;
  note?: string;
}

export interface InfusionSpan {
  start: ClinicalTime;
  durationH: number;
}

export interface LevelContext {
  isTeaching: boolean;
  drug: Drug;
  courseStart: ClinicalTime | null;
  now: Date;
  /** Infusions given on the course (given or partial). */
  infusions: InfusionSpan[];
  /** Collection times + fraction already recorded (minus the level being edited). */
  existing: Array<{ time: ClinicalTime; fraction: 'total' | 'free' }>;
}

export interface CheckedLevel {
  value: number;
  unit: LevelUnit;
  valueMgL: number;
  collected: ClinicalTime;
  sampleKind: SampleKind;
  fraction: 'total' | 'free';
  assayLowerLimit: number | null;
  loincCode: string | null;
  flags: Array<'during-infusion' | 'below-assay-limit' | 'post-dialysis'>;
  note: string | null;
  echo: string;
}

export type LevelCheck =
  { ok: true; level: CheckedLevel } | { ok: false; errors: Record<string, string[]> };

const sameInstant = (a: ClinicalTime, b: ClinicalTime) =>
  a.at !== null && b.at !== null ? Date.parse(a.at) === Date.parse(b.at) : a.hour === b.hour;

/**
 * The plausibility checks of a level: plausible range for the drug, time in the future or before
 * the course, drawn during an infusion (refused unless deliberately marked "during-infusion",
 * then kept and flagged), duplicates.
 */
export function checkLevel(input: LevelInput, ctx: LevelContext): LevelCheck {
  const errors: Record<string, string[]> = {};
  const add = (f: string, m: string) => (errors[f] ??= []).push(m);
  const timeField = ctx.isTeaching ? 'collectedHour' : 'collectedAt';
  const valueMgL = toMgL(input.value, input.unit, ctx.drug);
  const maxMgL = PLAUSIBLE_MAX_MG_L[ctx.drug];
  if (valueMgL > maxMgL) {
    const hint =
      input.unit !== 'umol/L' && input.value / UMOL_PER_MG[ctx.drug] <= maxMgL
        ? ` If the lab reported µmol/L, ${fmt(input.value)} µmol/L = ${fmt(input.value / UMOL_PER_MG[ctx.drug], 3)} mg/L: choose unit umol/L.`
        : '';
    add(
      'value',
      `${levelEcho(input.value, input.unit, ctx.drug)} is above the plausible range for ${ctx.drug} (up to ${maxMgL} mg/L).${hint}`,
    );
  }
  const flags: CheckedLevel['flags'] = [];
  const lloq = input.assayLowerLimit ?? null;
  if (lloq !== null && input.value < lloq) flags.push('below-assay-limit');
  if (input.sampleKind === 'post-dialysis') flags.push('post-dialysis');
  const collected = resolveTime(
    ctx.isTeaching,
    input.collectedAt,
    input.collectedHour,
    'collectedAt',
    'collectedHour',
    errors,
  );
  if (collected) {
    if (isInFuture(collected, ctx.now))
      add(timeField, `the collection time ${showTime(collected)} is in the future`);
    const cs = ctx.courseStart;
    if (cs && toHours(collected, cs.at) < toHours(cs, cs.at)) {
      add(
        timeField,
        `the collection time ${showTime(collected)} is before the course began (${showTime(cs)})`,
      );
    }
    const ref = ctx.infusions[0]?.start.at ?? collected.at;
    const t = toHours(collected, ref);
    const running = ctx.infusions.find((inf) => {
      const s = toHours(inf.start, ref);
      return t > s && t < s + inf.durationH;
    });
    if (running) {
      if (input.sampleKind === 'during-infusion') flags.push('during-infusion');
      else {
        add(
          'sampleKind',
          `collected at ${showTime(collected)}, during the infusion that started at ${showTime(running.start)} and ran ${fmt(running.durationH * 60)} min. A level drawn during an infusion cannot be read as a ${input.sampleKind}; if it was drawn there deliberately, mark the sample kind "during-infusion".`,
        );
      }
    } else if (input.sampleKind === 'during-infusion') flags.push('during-infusion');
    if (ctx.existing.some((e) => e.fraction === input.fraction && sameInstant(e.time, collected))) {
      add(
        timeField,
        `a ${input.fraction} level collected at ${showTime(collected)} is already recorded on this course (duplicate)`,
      );
    }
  }
  if (Object.keys(errors).length > 0 || !collected) return { ok: false, errors };
  return {
    ok: true,
    level: {
      value: input.value,
      unit: input.unit,
      valueMgL,
      collected,
      sampleKind: input.sampleKind,
      fraction: input.fraction,
      assayLowerLimit: lloq,
      loincCode: input.loincCode ?? null,
      flags,
      note: input.note ?? null,
      echo: levelEcho(input.value, input.unit, ctx.drug),
    },
  };
}
