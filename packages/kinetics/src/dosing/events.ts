import type { ResolvedModel } from '../models/parameters';
import type { Dose } from '../types';

/**
 * The dose list turned into the discontinuities the integrator must land on, sorted by time.
 * At `times[i]`: `bolus[i]` mg jumps into the central compartment, `depot[i]` mg (already × F) into the
 * absorption depot (oral doses land at dose time + tlag), and from `times[i]` until `times[i + 1]`
 * the total infusion rate into the central compartment is `rate[i]` mg/h.
 */
export interface EventSchedule {
  readonly times: Float64Array;
  readonly bolus: Float64Array;
  readonly depot: Float64Array;
  readonly rate: Float64Array;
}

/** Relative tolerance under which two event/output times are treated as the same instant. */
export const TIME_SNAP = 1e-11;

/** Whether two times are the same instant within `TIME_SNAP` (relative to max(1, |t|)). */
export function sameTime(a: number, b: number): boolean {
  return Math.abs(a - b) <= TIME_SNAP * Math.max(1, Math.abs(a), Math.abs(b));
}

/**
 * Build the event schedule from validated doses. Infusion rates are recomputed as a sum over the
 * infusions running in each interval (never by accumulating +R/−R), so the rate returns to exactly 0.
 */
export function buildEvents(doses: readonly Dose[], m: ResolvedModel): EventSchedule {
  const raw: number[] = [];
  for (const d of doses) {
    if (d.route === 'oral') raw.push(d.time + m.tlag);
    else if (d.route === 'bolus') raw.push(d.time);
    else raw.push(d.time, d.time + (d.duration as number));
  }
  raw.sort((a, b) => a - b);
  const uniq: number[] = [];
  for (const t of raw) {
    const last = uniq[uniq.length - 1];
    if (last === undefined || !sameTime(last, t)) uniq.push(t);
  }
  const n = uniq.length;
  const times = Float64Array.from(uniq);
  const bolus = new Float64Array(n);
  const depot = new Float64Array(n);
  const rate = new Float64Array(n);
  const indexOf = (t: number): number => {
    let lo = 0;
    let hi = n - 1;
    while (lo < hi) {
      const mid = (lo + hi) >> 1;
      if ((times[mid] as number) < t && !sameTime(times[mid] as number, t)) lo = mid + 1;
      else hi = mid;
    }
    return lo;
  };
  for (const d of doses) {
    if (d.route === 'bolus') {
      const i = indexOf(d.time);
      bolus[i] = (bolus[i] as number) + d.amount;
    } else if (d.route === 'oral') {
      const i = indexOf(d.time + m.tlag);
      depot[i] = (depot[i] as number) + m.F * d.amount;
    } else {
      const r = d.amount / (d.duration as number);
      const i0 = indexOf(d.time);
      const i1 = indexOf(d.time + (d.duration as number));
      for (let i = i0; i < i1; i++) rate[i] = (rate[i] as number) + r;
    }
  }
  return { times, bolus, depot, rate };
}
