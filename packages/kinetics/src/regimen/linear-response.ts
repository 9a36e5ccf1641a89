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

/**
 * Steady-state concentration (mg/L) `s` h (0 ≤ s ≤ τ) after an oral/IM dose `amount` (mg) repeated every τ,
 * first-order absorption with F, ka and lag (Gibaldi M, Perrier D. Pharmacokinetics, 2nd ed., 1982, ch. 3;
 * pk-reference A4), term by term over the exponentials of a linear model:
 *   C_ss(t) = F·D·Σ_i A_i·ka/(ka − λ_i)·[e^(−λ_i t′)/(1 − e^(−λ_i τ)) − e^(−ka t′)/(1 − e^(−ka τ))],
 * with t′ = (s − tlag) taken modulo τ (A4: "with a lag time, replace t by t − tlag, taken modulo τ").
 * At ka = λ_i (the singular case of A3) the term is the limit of the geometric sum of the single-dose limit
 * ka·t·e^(−λt): F·D·A_i·ka·e^(−λ t′)·[t′/(1 − q) + τ·q/(1 − q)²], q = e^(−λτ) (derived from A3's limit).
 * s = 0 and s = τ give the same value: the pre-dose trough.
 */
export function steadyStateOralConcentration(
  m: ExponentialModel,
  amount: number,
  tau: number,
  s: number,
): number {
  let t = (s - m.tlag) % tau;
  if (t < 0) t += tau;
  const ka = m.ka;
  const qa = Math.exp(-ka * tau);
  let c = 0;
  for (let i = 0; i < m.a.length; i++) {
    const A = m.a[i]!;
    const l = m.lambda[i]!;
    const q = Math.exp(-l * tau);
    if (Math.abs(ka - l) < ORAL_SINGULAR * l) {
      c +=
        m.F * amount * A * ka * Math.exp(-l * t) * (t / (1 - q) + (tau * q) / ((1 - q) * (1 - q)));
    } else {
      c +=
        ((m.F * amount * A * ka) / (ka - l)) *
        (Math.exp(-l * t) / (1 - q) - Math.exp(-ka * t) / (1 - qa));
    }
  }
  return c;
}

/**
 * Time of the steady-state oral peak after the dose (h), one compartment, closed form (Gibaldi M, Perrier D.
 * Pharmacokinetics, 2nd ed., 1982, ch. 3; pk-reference A4):
 *   tmax,ss = tlag + ln[ka(1 − e^(−kτ)) / (k(1 − e^(−ka τ)))]/(ka − k), taken modulo τ.
 * Returns undefined for two compartments or ka ≈ k (the caller then uses `maximiseOnInterval`).
 */
export function oralSteadyStateTmax(m: ExponentialModel, tau: number): number | undefined {
  if (m.a.length !== 1) return undefined;
  const k = m.lambda[0]!;
  const ka = m.ka;
  if (Math.abs(ka - k) < ORAL_SINGULAR * k) return undefined;
  const t = Math.log((ka * (1 - Math.exp(-k * tau))) / (k * (1 - Math.exp(-ka * tau)))) / (ka - k);
  return (m.tlag + t) % tau;
}

/**
 * Maximum of f on [a, b]: a grid of `n` points, then golden-section refinement in the bracket of the best
 * grid point (Kiefer J. Proc Am Math Soc 1953;4:502–506). Exact enough for a unimodal concentration curve.
 */
export function maximiseOnInterval(
  f: (t: number) => number,
  a: number,
  b: number,
  n = 200,
): { time: number; value: number } {
  let best = a;
  let bestV = f(a);
  const h = (b - a) / n;
  for (let i = 1; i <= n; i++) {
    const t = a + i * h;
    const v = f(t);
    if (v > bestV) {
      bestV = v;
      best = t;
    }
  }
  let lo = Math.max(a, best - h);
  let hi = Math.min(b, best + h);
  const g = (Math.sqrt(5) - 1) / 2;
  let x1 = hi - g * (hi - lo);
  let x2 = lo + g * (hi - lo);
  let f1 = f(x1);
  let f2 = f(x2);
  for (let it = 0; it < 60 && hi - lo > 1e-9 * Math.max(1, b); it++) {
    if (f1 < f2) {
      lo = x1;
      x1 = x2;
      f1 = f2;
      x2 = lo + g * (hi - lo);
      f2 = f(x2);
    } else {
      hi = x2;
      x2 = x1;
      f2 = f1;
      x1 = hi - g * (hi - lo);
      f1 = f(x1);
    }
  }
  const tm = (lo + hi) / 2;
  const vm = f(tm);
  return vm >= bestV ? { time: tm, value: vm } : { time: best, value: bestV };
}

/**
 * Steady-state oral/IM peak: time after the dose (h) and concentration (mg/L). One compartment: the A4
 * closed form `oralSteadyStateTmax`; otherwise (or at ka ≈ k) `maximiseOnInterval` over the interval.
 */
export function oralSteadyStatePeak(
  m: ExponentialModel,
  amount: number,
  tau: number,
): { time: number; concentration: number } {
  const f = (s: number): number => steadyStateOralConcentration(m, amount, tau, s);
  const tm = oralSteadyStateTmax(m, tau);
  if (tm !== undefined && tm >= 0 && tm <= tau) return { time: tm, concentration: f(tm) };
  const r = maximiseOnInterval(f, 0, tau);
  return { time: r.time, concentration: r.value };
}
