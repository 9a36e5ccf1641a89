import { validateDoses } from '../dosing/validate-doses';
import { EngineError } from '../errors';
import { macroRateConstants, resolveModel, type ResolvedModel } from '../models/parameters';
import { requireFinite, requireNonNegative, requirePositive } from '../models/validate';
import type { Dose, ModelStructure, PkParameters } from '../types';

/**
 * Closed-form (analytic) solutions of the LINEAR one- and two-compartment models, by superposition of
 * single-dose responses (valid because the system is linear). An independent check on the RK4 profile.
 *
 * Sources (textbook equations, from memory; each verified numerically against event-aligned RK4):
 * - IV bolus, 1 cmt: C = (D/V)e^(−kt) — Gibaldi M, Perrier D. Pharmacokinetics, 2nd ed., 1982, ch. 1.
 * - Zero-order infusion, 1 cmt: C = (R0/CL)(1 − e^(−kt)) during, × e^(−k(t−T)) after — ibid., ch. 1.
 * - First-order absorption with lag (Bateman H. Proc Cambridge Philos Soc 1910;15:423-7; Gibaldi & Perrier ch. 1):
 *   C = F·D·ka/(V(ka − k))·(e^(−k t′) − e^(−ka t′)), t′ = t − tlag; at ka = k the limit (F·D·k/V)·t′·e^(−k t′).
 * - Two compartments (ibid., ch. 2): unit impulse response Σ u_λ e^(−λt) over λ ∈ {α, β} with
 *   u_α = (α − k21)/(V1(α − β)), u_β = (k21 − β)/(V1(α − β)); infusion and absorption responses are its
 *   convolution with the input (Cλ = R0·u_λ/λ; oral coefficient F·D·ka·u_λ/(ka − λ)).
 * - Multiple dosing and steady state by superposition; the infinite sum of exponentials is the geometric
 *   series e^(−λt)/(1 − e^(−λτ)) (Gibaldi & Perrier ch. 3).
 */

/** coef · s^power · e^(−rate·s), with s the time since the start of the piece. */
export interface ExpTerm {
  readonly coef: number;
  readonly rate: number;
  readonly power: 0 | 1;
}

/** C(t) = constant + Σ terms for from ≤ t < to (absolute times, h; mg/L). */
export interface ResponsePiece {
  readonly from: number;
  readonly to: number;
  readonly constant: number;
  readonly terms: readonly ExpTerm[];
}

/** Disposition modes: the unit impulse response (mg/L per mg into the central compartment). */
function modes(m: ResolvedModel): { u: number; lambda: number }[] {
  if (m.compartments === 1) return [{ u: 1 / m.V1, lambda: m.k10 }];
  const [alpha, beta] = macroRateConstants(m.k10, m.k12, m.k21);
  const d = m.V1 * (alpha - beta);
  return [
    { u: (alpha - m.k21) / d, lambda: alpha },
    { u: (m.k21 - beta) / d, lambda: beta },
  ];
}

function resolveLinear(
  model: ModelStructure,
  parameters: PkParameters,
  doses: readonly Dose[],
  fn: string,
): ResolvedModel {
  validateDoses(doses, fn);
  const m = resolveModel(
    model,
    parameters,
    doses.some((d) => d.route === 'oral'),
    fn,
  );
  if (m.michaelisMenten) {
    throw new EngineError(
      'unsupported',
      `${fn}: closed forms exist only for linear elimination (model.elimination is "michaelis-menten")`,
      'model.elimination',
    );
  }
  return m;
}

/** The response to one dose as analytic pieces (absolute time). */
function doseResponse(m: ResolvedModel, d: Dose): ResponsePiece[] {
  const md = modes(m);
  if (d.route === 'bolus') {
    return [
      {
        from: d.time,
        to: Infinity,
        constant: 0,
        terms: md.map(({ u, lambda }) => ({ coef: d.amount * u, rate: lambda, power: 0 as const })),
      },
    ];
  }
  if (d.route === 'infusion') {
    const T = d.duration as number;
    const r = d.amount / T;
    let constant = 0;
    const during: ExpTerm[] = [];
    const after: ExpTerm[] = [];
    for (const { u, lambda } of md) {
      const c = (r * u) / lambda;
      constant += c;
      during.push({ coef: -c, rate: lambda, power: 0 });
      after.push({ coef: c * -Math.expm1(-lambda * T), rate: lambda, power: 0 });
    }
    return [
      { from: d.time, to: d.time + T, constant, terms: during },
      { from: d.time + T, to: Infinity, constant: 0, terms: after },
    ];
  }
  const { ka, F } = m;
  const fd = F * d.amount * ka;
  const terms: ExpTerm[] = [];
  let kaCoef = 0;
  for (const { u, lambda } of md) {
    if (Math.abs(ka - lambda) <= 1e-7 * Math.max(ka, lambda)) {
      terms.push({ coef: fd * u, rate: lambda, power: 1 });
    } else {
      const c = (fd * u) / (ka - lambda);
      terms.push({ coef: c, rate: lambda, power: 0 });
      kaCoef -= c;
    }
  }
  if (kaCoef !== 0) terms.push({ coef: kaCoef, rate: ka, power: 0 });
  return [{ from: d.time + m.tlag, to: Infinity, constant: 0, terms }];
}

function evalPiece(p: ResponsePiece, t: number): number {
  const s = t - p.from;
  let c = p.constant;
  for (const term of p.terms) {
    const e = term.coef * Math.exp(-term.rate * s);
    c += term.power === 1 ? e * s : e;
  }
  return c;
}

/** ∫ s^p e^(−λs) ds from s = a to b (p ∈ {0, 1}). */
function termIntegral(term: ExpTerm, a: number, b: number): number {
  const l = term.rate;
  if (term.power === 0) {
    const ea = Math.exp(-l * a);
    const eb = b === Infinity ? 0 : Math.exp(-l * b);
    return (term.coef * (ea - eb)) / l;
  }
  const fa = Math.exp(-l * a) * (1 + l * a);
  const fb = b === Infinity ? 0 : Math.exp(-l * b) * (1 + l * b);
  return (term.coef * (fa - fb)) / (l * l);
}

function pieceAuc(p: ResponsePiece, t1: number, t2: number): number {
  const a = Math.max(p.from, t1);
  const b = Math.min(p.to, t2);
  if (!(b > a)) return 0;
  let auc = b === Infinity ? (p.constant === 0 ? 0 : Infinity) : p.constant * (b - a);
  for (const term of p.terms) auc += termIntegral(term, a - p.from, b - p.from);
  return auc;
}

function concentrationFromPieces(pieces: readonly ResponsePiece[], t: number): number {
  let c = 0;
  for (const p of pieces) if (t >= p.from && t < p.to) c += evalPiece(p, t);
  return c;
}

/**
 * Analytic response pieces of a dose list (for callers that evaluate many times).
 * @throws {EngineError} `invalid-input`; `unsupported` for Michaelis-Menten models.
 */
export function closedFormPieces(
  model: ModelStructure,
  parameters: PkParameters,
  doses: readonly Dose[],
): ResponsePiece[] {
  const m = resolveLinear(model, parameters, doses, 'closedFormPieces');
  return doses.flatMap((d) => doseResponse(m, d));
}

/**
 * Central concentration (mg/L) at each time by superposition of closed-form single-dose responses
 * (right-continuous: a bolus at exactly t is included). Linear models only.
 * @throws {EngineError} `invalid-input` naming the field; `unsupported` for Michaelis-Menten.
 * @example
 * closedFormConcentrations({ compartments: 1, elimination: 'linear' }, { CL: 5, V1: 50 },
 *   [{ time: 0, amount: 1000, route: 'bolus' }], [12]) // => [6.02388...] = 20·e^(−1.2)
 */
export function closedFormConcentrations(
  model: ModelStructure,
  parameters: PkParameters,
  doses: readonly Dose[],
  times: readonly number[],
): number[] {
  const fn = 'closedFormConcentrations';
  const m = resolveLinear(model, parameters, doses, fn);
  times.forEach((t, i) => requireFinite(fn, `times[${i}]`, t));
  const pieces = doses.flatMap((d) => doseResponse(m, d));
  return times.map((t) => concentrationFromPieces(pieces, t));
}

/**
 * AUC (mg·h/L) of the central concentration from `from` to `to` (`to` may be Infinity), analytic.
 * Single bolus: AUC0–∞ = D/CL (Gibaldi & Perrier ch. 1).
 * @throws {EngineError} `invalid-input`; `unsupported` for Michaelis-Menten.
 * @example closedFormAuc({ compartments: 1, elimination: 'linear' }, { CL: 5, V1: 50 },
 *   [{ time: 0, amount: 1000, route: 'bolus' }], 0, Infinity) // => 200
 */
export function closedFormAuc(
  model: ModelStructure,
  parameters: PkParameters,
  doses: readonly Dose[],
  from: number,
  to: number,
): number {
  const fn = 'closedFormAuc';
  const m = resolveLinear(model, parameters, doses, fn);
  requireFinite(fn, 'from', from);
  if (Number.isNaN(to) || to < from) {
    throw new EngineError('invalid-input', `${fn}: to must be ≥ from (got ${to})`, 'to');
  }
  let auc = 0;
  for (const d of doses) for (const p of doseResponse(m, d)) auc += pieceAuc(p, from, to);
  return auc;
}

/** A dose repeated every τ forever: amount (mg), route and infusion duration (h). */
export interface RepeatedDose {
  readonly amount: number;
  readonly route: Dose['route'];
  readonly duration?: number;
}

/**
 * Steady-state concentration (mg/L) at `tSinceDose` (0 ≤ t < τ) of a dose repeated every `tau` hours forever:
 * C_ss(t) = Σ_{n≥0} C_single(t + nτ), summed exactly; the tail of each exponential is the geometric series
 * e^(−λs)/(1 − e^(−λτ)) (Gibaldi & Perrier ch. 3; for intermittent infusion this reproduces Sawchuk RJ,
 * Zaske DE. J Pharmacokinet Biopharm 1976;4:183-95: Cmax,ss = (R0/CL)(1 − e^(−kT))/(1 − e^(−kτ))).
 * @throws {EngineError} `invalid-input` (tau ≤ 0, t outside [0, τ)); `unsupported` for Michaelis-Menten.
 * @example closedFormSteadyState({ compartments: 1, elimination: 'linear' }, { CL: 5, V1: 50 },
 *   { amount: 1000, route: 'bolus' }, 12, 0) // => 28.43... = 20/(1 − e^(−1.2))
 */
export function closedFormSteadyState(
  model: ModelStructure,
  parameters: PkParameters,
  dose: RepeatedDose,
  tau: number,
  tSinceDose: number,
): number {
  const fn = 'closedFormSteadyState';
  requirePositive(fn, 'tau', tau);
  requireNonNegative(fn, 'tSinceDose', tSinceDose);
  if (tSinceDose >= tau) {
    throw new EngineError('invalid-input', `${fn}: tSinceDose must be < tau`, 'tSinceDose');
  }
  const single: Dose = { ...dose, time: 0 };
  const m = resolveLinear(model, parameters, [single], fn);
  const pieces = doseResponse(m, single);
  const last = pieces[pieces.length - 1] as ResponsePiece;
  let c = 0;
  let n = 0;
  for (; tSinceDose + n * tau < last.from; n++)
    c += concentrationFromPieces(pieces, tSinceDose + n * tau);
  const s0 = tSinceDose + n * tau - last.from;
  for (const term of last.terms) {
    const q = Math.exp(-term.rate * tau);
    const e = term.coef * Math.exp(-term.rate * s0);
    c += term.power === 0 ? e / (1 - q) : e * (s0 / (1 - q) + (tau * q) / ((1 - q) * (1 - q)));
  }
  return c;
}

/**
 * AUC over one dosing interval at steady state (mg·h/L) = AUC0–∞ of a single dose = F·D/CL for any linear
 * model (Gibaldi & Perrier ch. 3); computed here from the closed form, not from the identity.
 * @example closedFormSteadyStateAuc({ compartments: 1, elimination: 'linear' }, { CL: 5, V1: 50 },
 *   { amount: 1000, route: 'infusion', duration: 1 }) // => 200
 */
export function closedFormSteadyStateAuc(
  model: ModelStructure,
  parameters: PkParameters,
  dose: RepeatedDose,
): number {
  return closedFormAuc(model, parameters, [{ ...dose, time: 0 }], 0, Infinity);
}
