import { fmt } from '../patients/common';

/**
 * Clinical times. A real patient's times are ISO date-times (`at`); a teaching patient's are hours
 * relative to the first dose (`hour`). Each request must give the one that fits the patient.
 */
export interface ClinicalTime {
  at: string | null;
  hour: number | null;
}

/** Allowed clock skew before a time counts as "in the future". */
export const FUTURE_TOLERANCE_MS = 5 * 60 * 1000;

export function resolveTime(
  isTeaching: boolean,
  at: string | undefined,
  hour: number | undefined,
  atField: string,
  hourField: string,
  errors: Record<string, string[]>,
  required = true,
): ClinicalTime | null {
  const add = (f: string, m: string) => (errors[f] ??= []).push(m);
  if (isTeaching) {
    if (at !== undefined)
      add(
        atField,
        `teaching cases have no real dates: give ${hourField} (hours from the first dose)`,
      );
    if (hour === undefined) {
      if (required) add(hourField, `required: hours from the first dose`);
      return null;
    }
    return { at: null, hour };
  }
  if (hour !== undefined)
    add(hourField, `real patients use clock times: give ${atField} as an ISO date-time`);
  if (at === undefined) {
    if (required) add(atField, 'required: an ISO date-time such as 2026-12-01T08:00:00Z');
    return null;
  }
  return { at: new Date(at).toISOString(), hour: null };
}

/** Hours between two ISO date-times. */
export const hoursBetween = (from: string, to: string): number =>
  (Date.parse(to) - Date.parse(from)) / 3_600_000;

/** A point on the course's timeline in hours; real times relative to `referenceAt`. */
export function toHours(t: ClinicalTime, referenceAt: string | null): number {
  if (t.hour !== null) return t.hour;
  return hoursBetween(referenceAt ?? (t.at as string), t.at as string);
}

export function isInFuture(t: ClinicalTime, now: Date): boolean {
  return t.at !== null && Date.parse(t.at) > now.getTime() + FUTURE_TOLERANCE_MS;
}

/** "2026-12-01 08:00 UTC" or "hour 12.5" for messages. */
export function showTime(t: ClinicalTime): string {
  if (t.hour !== null) return `hour ${fmt(t.hour)}`;
  return `${(t.at as string).slice(0, 16).replace('T', ' ')} UTC`;
}
