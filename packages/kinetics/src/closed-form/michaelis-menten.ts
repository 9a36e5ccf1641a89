import { EngineError } from '../errors';
import { requireNonNegative, requirePositive } from '../models/validate';

/**
 * Michaelis-Menten steady-state concentration (mg/L) for a constant input rate R (mg/h, or any time unit
 * matching Vmax): Css = Km·R/(Vmax − R) (Winter ME, Basic Clinical Pharmacokinetics, phenytoin chapter;
 * Bauer LA, Applied Clinical Pharmacokinetics, ch. 10 — from memory). R must already include S·F
 * (phenytoin sodium salt factor S = 0.92 is applied by the caller).
 * @throws {EngineError} `no-steady-state` when R ≥ Vmax: elimination saturates and the level rises without bound.
 * @example michaelisMentenSteadyState(415 / 24, 5.7, 300 / 24) // => 5.7·300/115 = 14.87 mg/L
 */
export function michaelisMentenSteadyState(vmax: number, km: number, rate: number): number {
  const fn = 'michaelisMentenSteadyState';
  requirePositive(fn, 'vmax', vmax);
  requirePositive(fn, 'km', km);
  requireNonNegative(fn, 'rate', rate);
  if (rate >= vmax) {
    throw new EngineError(
      'no-steady-state',
      `${fn}: input rate ${rate} ≥ Vmax ${vmax}: Michaelis-Menten elimination saturates and there is no steady state`,
      'rate',
    );
  }
  return (km * rate) / (vmax - rate);
}

/**
 * Input rate that gives a target steady state: R = Vmax·Css/(Km + Css) (same sources as above).
 * @example michaelisMentenRateForTarget(415, 5.7, 15) // => 300.7 mg/day
 */
export function michaelisMentenRateForTarget(vmax: number, km: number, css: number): number {
  const fn = 'michaelisMentenRateForTarget';
  requirePositive(fn, 'vmax', vmax);
  requirePositive(fn, 'km', km);
  requireNonNegative(fn, 'css', css);
  return (vmax * css) / (km + css);
}

/**
 * Time (h, if Vmax and R are per hour) to reach 90 % of Css from C = 0 under constant input R, exact
 * integral of dC/dt = R/V − Vmax·C/(V(Km + C)):
 * t90 = Km·V·(ln10·Vmax − 0.9·R)/(Vmax − R)² (derived; the textbook form uses 2.3 for ln 10 —
 * Winter ME, Basic Clinical Pharmacokinetics, phenytoin chapter, from memory).
 * @throws {EngineError} `no-steady-state` when R ≥ Vmax.
 */
export function michaelisMentenTime90(
  vmax: number,
  km: number,
  volume: number,
  rate: number,
): number {
  const fn = 'michaelisMentenTime90';
  requirePositive(fn, 'volume', volume);
  michaelisMentenSteadyState(vmax, km, rate);
  return (km * volume * (Math.LN10 * vmax - 0.9 * rate)) / ((vmax - rate) * (vmax - rate));
}

/**
 * Time for the level to fall from c0 to c (mg/L) with no input:
 * t = (V/Vmax)·[(c0 − c) + Km·ln(c0/c)] (Winter ME, Basic Clinical Pharmacokinetics, phenytoin chapter, from memory).
 * @throws {EngineError} `invalid-input` unless c0 ≥ c > 0.
 */
export function michaelisMentenWashoutTime(
  vmax: number,
  km: number,
  volume: number,
  c0: number,
  c: number,
): number {
  const fn = 'michaelisMentenWashoutTime';
  requirePositive(fn, 'vmax', vmax);
  requirePositive(fn, 'km', km);
  requirePositive(fn, 'volume', volume);
  requirePositive(fn, 'c0', c0);
  requirePositive(fn, 'c', c);
  if (c > c0) throw new EngineError('invalid-input', `${fn}: c must be ≤ c0`, 'c');
  return (volume / vmax) * (c0 - c + km * Math.log(c0 / c));
}
