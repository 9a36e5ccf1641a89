import type { Dose as EngineDose } from '@ebbtide/kinetics';
import type { Dose, Level } from '@ebbtide/contracts';
import { hoursFrom } from '../../../lib/clinical-format';

/** Hour 0 of a course's timeline: its first recorded dose (real patients). */
export function referenceAt(doses: readonly Dose[]): string | null {
  let first: string | null = null;
  for (const d of doses)
    if (d.startAt && (!first || Date.parse(d.startAt) < Date.parse(first))) first = d.startAt;
  return first;
}

export const doseHour = (d: Dose, ref: string | null) =>
  hoursFrom(ref, { at: d.startAt, hour: d.startHour });
export const levelHour = (l: Level, ref: string | null) =>
  hoursFrom(ref, { at: l.collectedAt, hour: l.collectedHour });

/** The recorded doses as engine doses (missed doses are kept for the record, not simulated). */
export function engineDoses(doses: readonly Dose[], ref: string | null): EngineDose[] {
  return doses
    .filter((d) => d.administrationStatus !== 'missed')
    .map((d): EngineDose => {
      const time = doseHour(d, ref);
      if (d.route === 'iv-infusion' && d.durationH)
        return { time, amount: d.amountMg, route: 'infusion', duration: d.durationH };
      if (d.route === 'oral' || d.route === 'im')
        return { time, amount: d.amountMg, route: 'oral' };
      return { time, amount: d.amountMg, route: 'bolus' };
    })
    .sort((a, b) => a.time - b.time);
}

/** An infusion running at `hour`, if any (to refuse a sample time during an infusion). */
export function infusionRunningAt(
  doses: readonly Dose[],
  ref: string | null,
  hour: number,
): Dose | null {
  for (const d of doses) {
    if (d.route !== 'iv-infusion' || !d.durationH || d.administrationStatus === 'missed') continue;
    const start = doseHour(d, ref);
    if (hour > start + 1e-6 && hour < start + d.durationH - 1e-6) return d;
  }
  return null;
}
