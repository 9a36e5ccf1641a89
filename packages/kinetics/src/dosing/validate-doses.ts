import { EngineError } from '../errors';
import { requireFinite, requireNonNegative, requirePositive } from '../models/validate';
import type { Dose } from '../types';

/**
 * Check a dose list as recorded: finite times, amounts ≥ 0 (a zero dose is allowed and has no effect),
 * a known route and, for infusions, a duration > 0.
 * @throws {EngineError} code `invalid-input`, field e.g. `doses[2].duration`.
 * @example validateDoses([{ time: 0, amount: 1000, route: 'infusion', duration: 1 }], 'simulate') // no throw
 */
export function validateDoses(doses: readonly Dose[], fn: string): void {
  if (!Array.isArray(doses)) {
    throw new EngineError('invalid-input', `${fn}: doses must be an array`, 'doses');
  }
  for (let i = 0; i < doses.length; i++) {
    const d = doses[i];
    const f = `doses[${i}]`;
    if (d == null || typeof d !== 'object') {
      throw new EngineError('invalid-input', `${fn}: ${f} must be an object`, f);
    }
    requireFinite(fn, `${f}.time`, d.time);
    requireNonNegative(fn, `${f}.amount`, d.amount);
    if (d.route !== 'bolus' && d.route !== 'infusion' && d.route !== 'oral') {
      throw new EngineError(
        'invalid-input',
        `${fn}: ${f}.route must be "bolus", "infusion" or "oral" (got ${String(d.route)})`,
        `${f}.route`,
      );
    }
    if (d.route === 'infusion') requirePositive(fn, `${f}.duration`, d.duration);
  }
}
