import { EngineError } from '../errors';
import { requireFinite, requireNonNegative, requirePositive } from '../models/validate';
import type { Dose, Route } from '../types';
import { validateDoses } from './validate-doses';

/** A regular regimen: optional loading dose, then a maintenance dose every `interval` hours. */
export interface RegimenSpec {
  /** Time of the first dose (loading dose if given, else first maintenance dose), h. Default 0. */
  readonly start?: number;
  readonly route: Route;
  /** Loading dose, mg (given at `start`). */
  readonly loadingDose?: number;
  /** Loading infusion duration, h; defaults to `infusionDuration`. */
  readonly loadingInfusionDuration?: number;
  readonly maintenanceDose: number;
  /** Dosing interval τ, h. */
  readonly interval: number;
  /** Infusion duration, h (route `infusion`). */
  readonly infusionDuration?: number;
  /** First maintenance dose time, h; default `start + interval` after a loading dose, else `start`. */
  readonly firstMaintenanceTime?: number;
  /** Number of maintenance doses … */
  readonly numberOfDoses?: number;
  /** … or the time before which maintenance doses are given (exclusive), h. Exactly one of the two. */
  readonly endTime?: number;
}

/**
 * Expand a regimen into the explicit dose list the engine simulates (the same shape as recorded doses).
 * Times are computed as first + i·τ (integer counter, no accumulated rounding).
 * @throws {EngineError} `invalid-input` naming the field.
 * @example generateRegimen({ route: 'infusion', loadingDose: 2000, maintenanceDose: 1250, interval: 12,
 *   infusionDuration: 1.5, numberOfDoses: 2 })
 * // => [{ time: 0, amount: 2000, … }, { time: 12, amount: 1250, … }, { time: 24, amount: 1250, … }]
 */
export function generateRegimen(spec: RegimenSpec): Dose[] {
  const fn = 'generateRegimen';
  if (spec == null || typeof spec !== 'object') {
    throw new EngineError('invalid-input', `${fn}: spec must be an object`, 'spec');
  }
  const start = spec.start === undefined ? 0 : requireFinite(fn, 'start', spec.start);
  const tau = requirePositive(fn, 'interval', spec.interval);
  const md = requireNonNegative(fn, 'maintenanceDose', spec.maintenanceDose);
  const infusion = spec.route === 'infusion';
  const duration = infusion
    ? requirePositive(fn, 'infusionDuration', spec.infusionDuration)
    : undefined;
  const doses: Dose[] = [];
  const make = (time: number, amount: number, d: number | undefined): Dose =>
    infusion
      ? { time, amount, route: spec.route, duration: d }
      : { time, amount, route: spec.route };
  if (spec.loadingDose !== undefined) {
    const ld = requireNonNegative(fn, 'loadingDose', spec.loadingDose);
    const ldDuration =
      infusion && spec.loadingInfusionDuration !== undefined
        ? requirePositive(fn, 'loadingInfusionDuration', spec.loadingInfusionDuration)
        : duration;
    doses.push(make(start, ld, ldDuration));
  }
  const first =
    spec.firstMaintenanceTime !== undefined
      ? requireFinite(fn, 'firstMaintenanceTime', spec.firstMaintenanceTime)
      : spec.loadingDose !== undefined
        ? start + tau
        : start;
  const hasN = spec.numberOfDoses !== undefined;
  const hasEnd = spec.endTime !== undefined;
  if (hasN === hasEnd) {
    throw new EngineError(
      'invalid-input',
      `${fn}: give exactly one of numberOfDoses or endTime`,
      'numberOfDoses',
    );
  }
  let n: number;
  if (hasN) {
    n = requireNonNegative(fn, 'numberOfDoses', spec.numberOfDoses);
    if (!Number.isInteger(n) || n > 100_000) {
      throw new EngineError(
        'invalid-input',
        `${fn}: numberOfDoses must be a whole number ≤ 100000`,
        'numberOfDoses',
      );
    }
  } else {
    const end = requireFinite(fn, 'endTime', spec.endTime);
    n = Math.max(0, Math.ceil((end - first) / tau - 1e-9));
    if (n > 100_000)
      throw new EngineError(
        'invalid-input',
        `${fn}: endTime gives more than 100000 doses`,
        'endTime',
      );
  }
  for (let i = 0; i < n; i++) doses.push(make(first + i * tau, md, duration));
  validateDoses(doses, fn);
  return doses;
}
