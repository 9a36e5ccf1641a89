/**
 * Helpers over a dose history: validation, sorting (without mutating the caller's array),
 * the dose a time falls after, and regimen-change detection. Pure; units h and mg.
 */
import { EngineError } from '../errors';
import type { DoseLike, MeasuredLevel } from './types';

export interface SortedDose {
  /** Index in the caller's array. */
  readonly index: number;
  readonly time: number;
  readonly amount: number;
  readonly duration: number;
  readonly end: number;
  readonly route: 'bolus' | 'infusion' | 'oral';
}

/** Validate and sort doses by time. @throws EngineError `invalid-input` naming `doses[i].field`. */
export function sortDoses(fn: string, doses: readonly DoseLike[]): SortedDose[] {
  if (!Array.isArray(doses) || doses.length === 0) {
    throw new EngineError('invalid-input', `${fn}: doses must be a non-empty array`, 'doses');
  }
  const out = doses.map((d, index): SortedDose => {
    if (d == null || typeof d !== 'object') {
      throw new EngineError(
        'invalid-input',
        `${fn}: doses[${index}] must be an object`,
        `doses[${index}]`,
      );
    }
    if (!Number.isFinite(d.time)) {
      throw new EngineError(
        'invalid-input',
        `${fn}: doses[${index}].time must be a finite number of hours`,
        `doses[${index}].time`,
      );
    }
    if (!Number.isFinite(d.amount) || d.amount < 0) {
      throw new EngineError(
        'invalid-input',
        `${fn}: doses[${index}].amount must be a non-negative number of mg`,
        `doses[${index}].amount`,
      );
    }
    const duration = d.route === undefined || d.route === 'infusion' ? (d.duration ?? 0) : 0;
    if (!Number.isFinite(duration) || duration < 0) {
      throw new EngineError(
        'invalid-input',
        `${fn}: doses[${index}].duration must be a non-negative number of hours`,
        `doses[${index}].duration`,
      );
    }
    const route = d.route ?? (duration > 0 ? 'infusion' : 'bolus');
    return { index, time: d.time, amount: d.amount, duration, end: d.time + duration, route };
  });
  return out.sort((a, b) => a.time - b.time || a.index - b.index);
}

/** Validate levels (finite time, finite value ≥ 0). @throws EngineError `invalid-input` / `no-levels`. */
export function validateLevels(
  fn: string,
  levels: readonly MeasuredLevel[],
  firstDoseTime?: number,
): void {
  if (!Array.isArray(levels) || levels.length === 0) {
    throw new EngineError('no-levels', `${fn}: at least one measured level is needed`, 'levels');
  }
  levels.forEach((l, i) => {
    if (l == null || typeof l !== 'object' || !Number.isFinite(l.time)) {
      throw new EngineError(
        'invalid-input',
        `${fn}: levels[${i}].time must be a finite number of hours`,
        `levels[${i}].time`,
      );
    }
    if (!Number.isFinite(l.value)) {
      throw new EngineError(
        'invalid-input',
        `${fn}: levels[${i}].value must be a finite concentration in mg/L`,
        `levels[${i}].value`,
      );
    }
    if (l.value < 0) {
      throw new EngineError(
        'invalid-input',
        `${fn}: levels[${i}].value is negative (${l.value} mg/L); a concentration cannot be below 0`,
        `levels[${i}].value`,
      );
    }
    if (l.lloq !== undefined && (!Number.isFinite(l.lloq) || l.lloq <= 0)) {
      throw new EngineError(
        'invalid-input',
        `${fn}: levels[${i}].lloq must be a positive concentration in mg/L`,
        `levels[${i}].lloq`,
      );
    }
    if (firstDoseTime !== undefined && l.time < firstDoseTime) {
      throw new EngineError(
        'level-before-first-dose',
        `${fn}: levels[${i}] at ${l.time} h was drawn before the first dose (${firstDoseTime} h)`,
        `levels[${i}].time`,
      );
    }
  });
}

/** Position of the last dose starting at or before t (−1 if none). */
export function lastDoseAtOrBefore(sorted: readonly SortedDose[], t: number): number {
  let k = -1;
  for (let i = 0; i < sorted.length; i++) if (sorted[i]!.time <= t) k = i;
  return k;
}

const same = (a: number, b: number): boolean =>
  Math.abs(a - b) <= 1e-6 * Math.max(1, Math.abs(a), Math.abs(b));

/**
 * Start position (in sorted doses) of the regimen in force at dose position `pos`: walk back while
 * amount, duration and interval stay the same (intervals compared within `intervalTolerance` h).
 */
export function regimenStart(
  sorted: readonly SortedDose[],
  pos: number,
  intervalTolerance = 0.5,
): number {
  let start = pos;
  const cur = sorted[pos]!;
  const interval = pos > 0 ? cur.time - sorted[pos - 1]!.time : undefined;
  while (start > 0) {
    const prev = sorted[start - 1]!;
    if (!same(prev.amount, cur.amount) || !same(prev.duration, cur.duration)) break;
    const gap = sorted[start]!.time - prev.time;
    if (interval === undefined || Math.abs(gap - interval) > intervalTolerance) break;
    start--;
  }
  return start;
}

/** Most common dosing interval (h, rounded to 0.25 h) in the history, or undefined with one dose. */
export function usualInterval(sorted: readonly SortedDose[]): number | undefined {
  const counts = new Map<number, number>();
  for (let i = 1; i < sorted.length; i++) {
    const g = Math.round((sorted[i]!.time - sorted[i - 1]!.time) * 4) / 4;
    if (g > 0) counts.set(g, (counts.get(g) ?? 0) + 1);
  }
  let best: number | undefined;
  let bestCount = 0;
  for (const [g, c] of counts)
    if (c > bestCount || (c === bestCount && best !== undefined && g < best)) {
      best = g;
      bestCount = c;
    }
  return best;
}
