/**
 * Exact concentrations and AUCs of LINEAR one- and two-compartment models as sums of exponentials,
 * by superposition over doses. Used where many evaluations are needed (MAP objective, regimen search,
 * PTA, sampling design); `simulate` (RK4) stays the reference and the tests compare the two.
 *
 * Unit-bolus response C(t) = Σ_i A_i·e^(−λ_i t):
 *   one compartment A = 1/V1, λ = CL/V1 (Gibaldi M, Perrier D. Pharmacokinetics, 2nd ed., 1982, ch. 1);
 *   two compartments A = (α − k21)/(V1(α − β)), B = (k21 − β)/(V1(α − β)) (ibid. ch. 2; pk-reference A6).
 * Zero-order infusion (rate R for T): C = R·Σ (A_i/λ_i)(1 − e^(−λ_i·min(t,T)))·e^(−λ_i·max(0, t−T)) (ibid., A2/A6).
 * First-order absorption: C = F·D·Σ A_i·ka/(ka − λ_i)·(e^(−λ_i t′) − e^(−ka t′)), t′ = t − tlag (Bateman 1910; A3).
 * Superposition over doses (A4) and, at steady state every τ, each term × 1/(1 − e^(−λ τ)) (A4, A6).
 * AUCs are the exact integrals of these terms.
 */
import { EngineError } from '../errors';
import { macroRateConstants, resolveModel } from '../models/parameters';
import type { Dose, ModelStructure, PkParameters } from '../types';

/** Exponential-sum description of a linear model's unit-bolus response. */
export interface ExponentialModel {
  /** Coefficients A_i, 1/L. */
  readonly a: readonly number[];
  /** Rate constants λ_i, 1/h. */
  readonly lambda: readonly number[];
  readonly ka: number;
  readonly F: number;
  readonly tlag: number;
  /** Clearance, L/h. */
  readonly CL: number;
}

/**
 * Exponential form of a linear model.
 * @throws EngineError `not-linear` for Michaelis-Menten elimination; `invalid-input` from `resolveModel`.
 * @example exponentialModel({ compartments: 1, elimination: 'linear' }, { CL: 5, V1: 50 }).lambda // => [0.1]
 */
export function exponentialModel(
  model: ModelStructure,
  parameters: PkParameters,
  needsAbsorption = false,
): ExponentialModel {
  if (model?.elimination === 'michaelis-menten') {
    throw new EngineError(
      'not-linear',
      'exponentialModel: Michaelis-Menten elimination has no exponential-sum solution',
      'model.elimination',
    );
  }
  const m = resolveModel(model, parameters, needsAbsorption, 'exponentialModel');
  const CL = m.k10 * m.V1;
  if (m.compartments === 1) {
    return { a: [1 / m.V1], lambda: [m.k10], ka: m.ka, F: m.F, tlag: m.tlag, CL };
  }
  const [al, be] = macroRateConstants(m.k10, m.k12, m.k21);
  const d = m.V1 * (al - be);
  return {
    a: [(al - m.k21) / d, (m.k21 - be) / d],
    lambda: [al, be],
    ka: m.ka,
    F: m.F,
    tlag: m.tlag,
    CL,
  };
}

const ORAL_SINGULAR = 1e-6;

/** Concentration (mg/L) at `s` h after the start of one dose (s ≤ 0 → 0). */
export function singleDoseConcentration(m: ExponentialModel, dose: Dose, s: number): number {
  if (s <= 0 && !(s === 0 && dose.route === 'bolus')) return 0;
  let c = 0;
  for (let i = 0; i < m.a.length; i++) {
    const A = m.a[i]!;
    const l = m.lambda[i]!;
    if (dose.route === 'bolus') c += dose.amount * A * Math.exp(-l * s);
    else if (dose.route === 'infusion') {
      const T = dose.duration!;
      const R = dose.amount / T;
      c += ((R * A) / l) * (1 - Math.exp(-l * Math.min(s, T))) * Math.exp(-l * Math.max(0, s - T));
    } else {
      const t = s - m.tlag;
      if (t <= 0) continue;
      const ka = m.ka;
      if (Math.abs(ka - l) < ORAL_SINGULAR * l)
        c += m.F * dose.amount * A * ka * t * Math.exp(-l * t);
      else c += ((m.F * dose.amount * A * ka) / (ka - l)) * (Math.exp(-l * t) - Math.exp(-ka * t));
    }
  }
  return c;
}

/** AUC (mg·h/L) from the start of one dose to `s` h after it. */
export function singleDoseAuc(m: ExponentialModel, dose: Dose, s: number): number {
  if (s <= 0) return 0;
  let auc = 0;
  for (let i = 0; i < m.a.length; i++) {
    const A = m.a[i]!;
    const l = m.lambda[i]!;
    if (dose.route === 'bolus') auc += (dose.amount * A * (1 - Math.exp(-l * s))) / l;
    else if (dose.route === 'infusion') {
      const T = dose.duration!;
      const R = dose.amount / T;
      const u = Math.min(s, T);
      auc += ((R * A) / l) * (u - (1 - Math.exp(-l * u)) / l);
      if (s > T) auc += ((R * A) / l) * (1 - Math.exp(-l * T)) * ((1 - Math.exp(-l * (s - T))) / l);
    } else {
      const t = s - m.tlag;
      if (t <= 0) continue;
      const ka = m.ka;
      if (Math.abs(ka - l) < ORAL_SINGULAR * l) {
        // ∫0^t ka·u·e^(−λu) du
        auc += m.F * dose.amount * A * ka * ((1 - Math.exp(-l * t) * (1 + l * t)) / (l * l));
      } else {
        auc +=
          ((m.F * dose.amount * A * ka) / (ka - l)) *
          ((1 - Math.exp(-l * t)) / l - (1 - Math.exp(-ka * t)) / ka);
      }
    }
  }
  return auc;
}

/** Concentrations (mg/L) at `times` under `doses`, by superposition. Right-continuous at a bolus. */
export function superposedConcentrations(
  m: ExponentialModel,
  doses: readonly Dose[],
  times: readonly number[],
): number[] {
  return times.map((t) => {
    let c = 0;
    for (const d of doses) if (d.time <= t) c += singleDoseConcentration(m, d, t - d.time);
    return c;
  });
}

/** AUC (mg·h/L) over [from, to] under `doses`, by superposition. */
export function superposedAuc(
  m: ExponentialModel,
  doses: readonly Dose[],
  from: number,
  to: number,
): number {
  let auc = 0;
  for (const d of doses)
    auc += singleDoseAuc(m, d, to - d.time) - singleDoseAuc(m, d, from - d.time);
  return auc;
}

/**
 * Steady-state concentration (mg/L) `s` h (0 ≤ s < τ) after the start of a dose repeated every τ, IV
 * bolus or infusion (pk-reference A4/A6: every exponential term × 1/(1 − e^(−λτ)), here written as the
 * current dose plus the geometric sum of all earlier ones).
 */
export function steadyStateConcentration(
  m: ExponentialModel,
  dose: Dose,
  tau: number,
  s: number,
): number {
  let c = singleDoseConcentration(m, dose, s);
  for (let i = 0; i < m.a.length; i++) {
    const A = m.a[i]!;
    const l = m.lambda[i]!;
    const acc = Math.exp(-l * tau) / (1 - Math.exp(-l * tau));
    if (dose.route === 'bolus') c += dose.amount * A * Math.exp(-l * s) * acc;
    else if (dose.route === 'infusion') {
      const T = dose.duration!;
      c += (((dose.amount / T) * A) / l) * (1 - Math.exp(-l * T)) * Math.exp(-l * (s - T)) * acc;
    } else {
      throw new EngineError(
        'invalid-input',
        'steadyStateConcentration: oral doses are not supported here',
        'dose.route',
      );
    }
  }
  return c;
}
