import type { AdministrationStatus, DoseRoute, Drug } from '@ebbtide/contracts';
import { fmt } from '../patients/common';
import { hoursBetween, isInFuture, resolveTime, showTime, type ClinicalTime } from './timing';

/** Display of an amount in both units: "1 g (1000 mg)". */
export function doseEcho(amount: number, unit: 'mg' | 'g'): string {
  return unit === 'g'
    ? `${fmt(amount)} g (${fmt(amount * 1000)} mg)`
    : `${fmt(amount)} mg (${fmt(amount / 1000)} g)`;
}

export interface DoseInput {
  amount: number;
  unit: 'mg' | 'g';
  route: DoseRoute;
  startAt?: string;
  startHour?: number;
  infusionMinutes?: number;
  endAt?: string;
  endHour?: number;
  administrationStatus: AdministrationStatus;
  note?: string;
}

export interface DoseContext {
  isTeaching: boolean;
  drug: Drug;
  /** Plausible single-dose range of the course's drug model, mg. */
  plausibleMg: { min: number; max: number };
  courseStart: ClinicalTime | null;
  now: Date;
  /** Start times already recorded on the course (minus the dose being edited), for duplicates. */
  existingStarts: ClinicalTime[];
}

export interface CheckedDose {
  amount: number;
  unit: 'mg' | 'g';
  amountMg: number;
  route: DoseRoute;
  start: ClinicalTime;
  durationH: number | null;
  administrationStatus: AdministrationStatus;
  note: string | null;
  echo: string;
}

export type DoseCheck =
  { ok: true; dose: CheckedDose } | { ok: false; errors: Record<string, string[]> };

const sameTime = (a: ClinicalTime, b: ClinicalTime) =>
  a.at !== null && b.at !== null ? Date.parse(a.at) === Date.parse(b.at) : a.hour === b.hour;

/**
 * The plausibility checks of a dose (patient safety): units, the drug's plausible single-dose
 * range (with a grams/milligrams hint), infusion duration, time in the future or before the
 * course, duplicates.
 */
export function checkDose(input: DoseInput, ctx: DoseContext): DoseCheck {
  const errors: Record<string, string[]> = {};
  const add = (f: string, m: string) => (errors[f] ??= []).push(m);
  const amountMg = input.unit === 'g' ? input.amount * 1000 : input.amount;
  const { min, max } = ctx.plausibleMg;
  if (amountMg < min || amountMg > max) {
    const range = `${ctx.drug} ${fmt(min)}–${fmt(max)} mg`;
    if (input.unit === 'mg' && input.amount * 1000 >= min && input.amount * 1000 <= max) {
      add(
        'amount',
        `${fmt(input.amount)} mg is outside the plausible single dose (${range}) and looks like grams: ${fmt(input.amount)} g = ${fmt(input.amount * 1000)} mg. Re-enter with the unit you meant.`,
      );
    } else if (input.unit === 'g' && input.amount >= min && input.amount <= max) {
      add(
        'amount',
        `${fmt(input.amount)} g (${fmt(amountMg)} mg) is outside the plausible single dose (${range}) and looks like milligrams: did you mean ${fmt(input.amount)} mg? Re-enter with the unit you meant.`,
      );
    } else {
      add(
        'amount',
        `${doseEcho(input.amount, input.unit)} is outside the plausible single dose (${range})`,
      );
    }
  }
  const start = resolveTime(
    ctx.isTeaching,
    input.startAt,
    input.startHour,
    'startAt',
    'startHour',
    errors,
  );
  let durationH: number | null = null;
  if (input.route === 'iv-infusion') {
    const given = [
      input.infusionMinutes !== undefined,
      input.endAt !== undefined,
      input.endHour !== undefined,
    ].filter(Boolean).length;
    if (given === 0)
      add('infusionMinutes', 'an infusion needs its duration (infusionMinutes) or its end time');
    else if (given > 1) add('infusionMinutes', 'give the duration or the end time, not both');
    else if (input.infusionMinutes !== undefined) durationH = input.infusionMinutes / 60;
    else if (start) {
      const end = resolveTime(
        ctx.isTeaching,
        input.endAt,
        input.endHour,
        'endAt',
        'endHour',
        errors,
      );
      if (end)
        durationH =
          end.hour !== null
            ? end.hour - (start.hour as number)
            : hoursBetween(start.at as string, end.at as string);
      if (durationH !== null && durationH <= 0) {
        add(
          input.endAt !== undefined ? 'endAt' : 'endHour',
          'the infusion must end after it starts',
        );
        durationH = null;
      }
    }
    if (durationH !== null && durationH > 48)
      add('infusionMinutes', `an infusion of ${fmt(durationH)} h is implausible (over 48 h)`);
  } else if (
    input.infusionMinutes !== undefined ||
    input.endAt !== undefined ||
    input.endHour !== undefined
  ) {
    add('route', `only an iv-infusion has a duration or end time (route is ${input.route})`);
  }
  if (start) {
    if (isInFuture(start, ctx.now))
      add('startAt', `the dose time ${showTime(start)} is in the future; record doses once given`);
    const cs = ctx.courseStart;
    if (
      cs &&
      ((cs.at && start.at && Date.parse(start.at) < Date.parse(cs.at)) ||
        (cs.hour !== null && start.hour !== null && start.hour < cs.hour))
    ) {
      add(
        ctx.isTeaching ? 'startHour' : 'startAt',
        `the dose time ${showTime(start)} is before the course began (${showTime(cs)})`,
      );
    }
    if (ctx.existingStarts.some((t) => sameTime(t, start))) {
      add(
        ctx.isTeaching ? 'startHour' : 'startAt',
        `a dose at ${showTime(start)} is already recorded on this course (duplicate)`,
      );
    }
  }
  if (Object.keys(errors).length > 0 || !start) return { ok: false, errors };
  return {
    ok: true,
    dose: {
      amount: input.amount,
      unit: input.unit,
      amountMg,
      route: input.route,
      start,
      durationH,
      administrationStatus: input.administrationStatus,
      note: input.note ?? null,
      echo: doseEcho(input.amount, input.unit),
    },
  };
}
