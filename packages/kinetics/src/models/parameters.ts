import { EngineError } from '../errors';
import type { Dose, ModelStructure, PkParameters } from '../types';
import { requireNonNegative, requirePositive } from './validate';

/**
 * Parameters after validation, with defaults filled in and micro-constants derived (1/h).
 * k10 = CL/V1, k12 = Q/V1, k21 = Q/V2 (Gibaldi M, Perrier D. Pharmacokinetics, 2nd ed., 1982, ch. 2).
 * For Michaelis-Menten elimination k10 is 0 and `vmax`/`km` are set.
 */
export interface ResolvedModel {
  readonly compartments: 1 | 2;
  readonly michaelisMenten: boolean;
  readonly V1: number;
  readonly V2: number;
  readonly k10: number;
  readonly k12: number;
  readonly k21: number;
  readonly ka: number;
  readonly F: number;
  readonly tlag: number;
  readonly vmax: number;
  readonly km: number;
}

/**
 * Validate a model structure and its parameters and derive the micro-constants.
 * `needsAbsorption` is true when any dose is oral, which makes `ka` required.
 * @throws {EngineError} code `invalid-input` naming the field (e.g. `parameters.CL`).
 * @example resolveModel({ compartments: 1, elimination: 'linear' }, { CL: 5, V1: 50 }, false).k10 // => 0.1
 */
export function resolveModel(
  model: ModelStructure,
  parameters: PkParameters,
  needsAbsorption: boolean,
  fn = 'resolveModel',
): ResolvedModel {
  if (model == null || typeof model !== 'object') {
    throw new EngineError('invalid-input', `${fn}: model must be an object`, 'model');
  }
  if (model.compartments !== 1 && model.compartments !== 2) {
    throw new EngineError(
      'invalid-input',
      `${fn}: model.compartments must be 1 or 2 (got ${String(model.compartments)})`,
      'model.compartments',
    );
  }
  if (model.elimination !== 'linear' && model.elimination !== 'michaelis-menten') {
    throw new EngineError(
      'invalid-input',
      `${fn}: model.elimination must be "linear" or "michaelis-menten" (got ${String(model.elimination)})`,
      'model.elimination',
    );
  }
  if (parameters == null || typeof parameters !== 'object') {
    throw new EngineError('invalid-input', `${fn}: parameters must be an object`, 'parameters');
  }
  const p = parameters;
  const V1 = requirePositive(fn, 'parameters.V1', p.V1);
  const mm = model.elimination === 'michaelis-menten';
  let k10 = 0;
  let vmax = 0;
  let km = 0;
  if (mm) {
    vmax = requirePositive(fn, 'parameters.Vmax', p.Vmax);
    km = requirePositive(fn, 'parameters.Km', p.Km);
  } else {
    k10 = requirePositive(fn, 'parameters.CL', p.CL) / V1;
  }
  let V2 = 0;
  let k12 = 0;
  let k21 = 0;
  if (model.compartments === 2) {
    const Q = requirePositive(fn, 'parameters.Q', p.Q);
    V2 = requirePositive(fn, 'parameters.V2', p.V2);
    k12 = Q / V1;
    k21 = Q / V2;
  }
  let ka = 0;
  let F = 1;
  let tlag = 0;
  if (needsAbsorption) {
    ka = requirePositive(fn, 'parameters.ka', p.ka);
    if (p.F !== undefined) {
      F = requirePositive(fn, 'parameters.F', p.F);
      if (F > 1) {
        throw new EngineError(
          'invalid-input',
          `${fn}: parameters.F is a fraction and must be ≤ 1 (got ${F})`,
          'parameters.F',
        );
      }
    }
    if (p.tlag !== undefined) tlag = requireNonNegative(fn, 'parameters.tlag', p.tlag);
  }
  return {
    compartments: model.compartments,
    michaelisMenten: mm,
    V1,
    V2,
    k10,
    k12,
    k21,
    ka,
    F,
    tlag,
    vmax,
    km,
  };
}

/**
 * Hybrid (macro) rate constants of the linear two-compartment model:
 * α, β = ½[(k10 + k12 + k21) ± √((k10 + k12 + k21)² − 4·k10·k21)]
 * (Gibaldi M, Perrier D. Pharmacokinetics, 2nd ed., 1982, ch. 2). For one compartment α = β = k10.
 * Returns `[α, β]` with α ≥ β > 0.
 * @example macroRateConstants(0.1, 0.2, 0.1) // => [≈0.3732, ≈0.0268]
 */
export function macroRateConstants(k10: number, k12: number, k21: number): [number, number] {
  const s = k10 + k12 + k21;
  const disc = Math.sqrt(Math.max(0, s * s - 4 * k10 * k21));
  const alpha = 0.5 * (s + disc);
  // β from the product α·β = k10·k21 avoids cancellation when β ≪ α.
  const beta = (k10 * k21) / alpha;
  return [alpha, beta];
}

/**
 * The fastest rate constant (1/h) present in the model: the bound on |λ| of the Jacobian that sets RK4's step limit.
 * Linear: max(α, ka). Michaelis-Menten: the elimination Jacobian is Vmax·Km/(V1(Km + C)²) ≤ Vmax/(V1·Km),
 * largest at C → 0; α is computed with that k10 bound.
 */
export function fastestRate(m: ResolvedModel): number {
  const k10 = m.michaelisMenten ? m.vmax / (m.V1 * m.km) : m.k10;
  const alpha = m.compartments === 2 ? macroRateConstants(k10, m.k12, m.k21)[0] : k10;
  return Math.max(alpha, m.ka);
}

/** True when any dose is oral (so ka is required). */
export function hasOralDose(doses: readonly Dose[]): boolean {
  for (const d of doses) if (d != null && d.route === 'oral') return true;
  return false;
}
