/**
 * Exposure targets and how a predicted exposure is scored against them.
 * A range may be one-sided (only `min` or only `max`).
 */
import { EngineError } from '../errors';

export interface Range {
  readonly min?: number;
  readonly max?: number;
}

/** Any combination of targets; every given one must be met. Units: AUC24 mg·h/L, peak/trough mg/L. */
export interface ExposureTarget {
  /** Steady-state AUC over 24 h (vancomycin 400–600 for MIC 1 mg/L: Rybak MJ et al. Am J Health-Syst Pharm 2020;77:835). */
  readonly auc24?: Range;
  /** Pre-dose concentration at steady state. */
  readonly trough?: Range;
  /** Peak concentration at steady state (see `peakDelay` of the finder). */
  readonly peak?: Range;
  /**
   * Average steady-state concentration, mg/L: the plateau R0/CL of a continuous infusion (pk-reference A2;
   * vancomycin 20–25 mg/L, from memory: Rybak MJ et al. 2020), Km·R/(Vmax − R) for Michaelis-Menten
   * (phenytoin total 10–20 mg/L, pk-reference E3), and AUC24,ss/24 = F·dose/(CL·τ) for any linear regimen
   * (Gibaldi M, Perrier D. Pharmacokinetics, 2nd ed., 1982, ch. 3; pk-reference A4).
   */
  readonly css?: Range;
  /** Peak/MIC at least `min` (aminoglycosides ≈ 8–10: Moore RD, Lietman PS, Smith CR. J Infect Dis 1987;155:93 — from memory). */
  readonly peakToMic?: { readonly min: number; readonly mic: number };
}

export interface Exposure {
  readonly auc24: number;
  readonly peak: number;
  readonly trough: number;
  /**
   * Average steady-state concentration, mg/L (see `ExposureTarget.css`). Absent: AUC24/24, which is the
   * interval average of any regimen at steady state.
   */
  readonly css?: number;
}

/** The average steady-state concentration of an exposure: `css` if given, else AUC24/24. */
export function averageConcentration(e: Exposure): number {
  return e.css ?? e.auc24 / 24;
}

/** Throws unless every range is well formed. */
export function validateTarget(fn: string, t: ExposureTarget): void {
  if (t == null || typeof t !== 'object')
    throw new EngineError('invalid-input', `${fn}: target must be an object`, 'target');
  let any = false;
  for (const k of ['auc24', 'trough', 'peak', 'css'] as const) {
    const r = t[k];
    if (r === undefined) continue;
    any = true;
    const { min, max } = r;
    if (
      (min !== undefined && !(Number.isFinite(min) && min >= 0)) ||
      (max !== undefined && !(Number.isFinite(max) && max > 0))
    ) {
      throw new EngineError(
        'invalid-input',
        `${fn}: target.${k} min/max must be non-negative numbers`,
        `target.${k}`,
      );
    }
    if (min === undefined && max === undefined)
      throw new EngineError('invalid-input', `${fn}: target.${k} needs min or max`, `target.${k}`);
    if (min !== undefined && max !== undefined && min > max)
      throw new EngineError('invalid-input', `${fn}: target.${k}.min exceeds max`, `target.${k}`);
  }
  if (t.peakToMic !== undefined) {
    any = true;
    if (!(t.peakToMic.min > 0) || !(t.peakToMic.mic > 0)) {
      throw new EngineError(
        'invalid-input',
        `${fn}: target.peakToMic needs positive min and mic`,
        'target.peakToMic',
      );
    }
  }
  if (!any)
    throw new EngineError(
      'invalid-input',
      `${fn}: target must give at least one of auc24, trough, peak, css, peakToMic`,
      'target',
    );
}

const inRange = (v: number, r: Range): boolean =>
  (r.min === undefined || v >= r.min) && (r.max === undefined || v <= r.max);

/** Which targets are met. */
export function targetsMet(
  e: Exposure,
  t: ExposureTarget,
): { readonly all: boolean; readonly each: Record<string, boolean> } {
  const each: Record<string, boolean> = {};
  if (t.auc24) each.auc24 = inRange(e.auc24, t.auc24);
  if (t.trough) each.trough = inRange(e.trough, t.trough);
  if (t.peak) each.peak = inRange(e.peak, t.peak);
  if (t.css) each.css = inRange(averageConcentration(e), t.css);
  if (t.peakToMic) each.peakToMic = e.peak / t.peakToMic.mic >= t.peakToMic.min;
  return { all: Object.values(each).every(Boolean), each };
}

/**
 * Distance from the target centre, root-mean-square over the given targets, each normalised:
 * two-sided range → |v − centre| / half-width (≤ 1 inside); one-sided → 0 when met, else the shortfall
 * relative to the bound plus 1. (Our own convention, documented here.)
 */
export function targetDistance(e: Exposure, t: ExposureTarget): number {
  const parts: number[] = [];
  const one = (v: number, r: Range): number => {
    if (r.min !== undefined && r.max !== undefined) {
      const half = (r.max - r.min) / 2 || Math.max(r.max, 1e-9) * 0.01;
      return Math.abs(v - (r.min + r.max) / 2) / half;
    }
    if (r.min !== undefined) return v >= r.min ? 0 : 1 + (r.min - v) / Math.max(r.min, 1e-9);
    return v <= r.max! ? 0 : 1 + (v - r.max!) / Math.max(r.max!, 1e-9);
  };
  if (t.auc24) parts.push(one(e.auc24, t.auc24));
  if (t.trough) parts.push(one(e.trough, t.trough));
  if (t.peak) parts.push(one(e.peak, t.peak));
  if (t.css) parts.push(one(averageConcentration(e), t.css));
  if (t.peakToMic) parts.push(one(e.peak / t.peakToMic.mic, { min: t.peakToMic.min }));
  return Math.sqrt(parts.reduce((s, x) => s + x * x, 0) / Math.max(1, parts.length));
}
