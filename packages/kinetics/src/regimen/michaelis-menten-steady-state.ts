/**
 * Steady state of a Michaelis-Menten (capacity-limited, phenytoin-like) maintenance regimen.
 *
 * Closed forms (Winter ME, Basic Clinical Pharmacokinetics, phenytoin chapter; Bauer LA, Applied Clinical
 * Pharmacokinetics, ch. 10 — from memory; pk-reference A8), with R the input rate of active drug (mg/h):
 *   R = S·F·dose/τ (S salt factor, e.g. 0.92 for phenytoin sodium; F bioavailability, 1 for IV),
 *   Css = Km·R/(Vmax − R), valid only for R < Vmax (no steady state otherwise),
 *   t90 = Km·V·(ln10·Vmax − 0.9·R)/(Vmax − R)² from C = 0 (`michaelisMentenTime90`).
 * Css is the plateau of a constant-rate input. Under intermittent dosing the interval peak and trough come from
 * an event-aligned RK4 simulation (`simulate`) run to steady state: it starts at C = Css (a bolus of V·Css at
 * t = 0, which only shortens the approach) and runs until the remaining approach error is below
 * `relativeTolerance`, judged by the slowest local elimination rate constant in the interval,
 * k = Vmax·Km/(V(Km + C)²) at the highest expected C (the Jacobian of the MM elimination term, pk-reference G2).
 * The simulated interval average AUCτ/τ is not exactly Css: Vmax·C/(Km + C) is concave, so by Jensen's
 * inequality the average of an oscillating level is slightly above the constant-input Css.
 */
import { michaelisMentenSteadyState, michaelisMentenTime90 } from '../closed-form/michaelis-menten';
import { EngineError } from '../errors';
import { simulate } from '../simulate';
import type { Dose, ModelStructure, PkParameters } from '../types';

/** How a maintenance dose is given, for the Michaelis-Menten steady state. */
export interface MichaelisMentenDosing {
  /** Dose as given (salt form), mg. */
  readonly amount: number;
  /** Dosing interval, h. */
  readonly interval: number;
  readonly route: 'oral' | 'infusion' | 'continuous';
  /** Infusion time, h (route `infusion`). */
  readonly infusionDuration?: number;
  /** Salt factor S (fraction of the dosed salt that is active drug); default 1. */
  readonly saltFactor?: number;
}

export interface MichaelisMentenSteadyStateOptions {
  /** Remaining relative approach error at which the simulation stops. */
  readonly relativeTolerance: number;
  /** Longest simulated time, h, before giving up on reaching steady state. */
  readonly maxSimulationHours: number;
  /** Output spacing over the last interval, h (the peak is the largest value on this grid). */
  readonly profileStep: number;
}

/** Defaults: 1e-6 remaining error, at most two years simulated, 0.05 h output grid. */
export const michaelisMentenSteadyStateDefaultOptions: Readonly<MichaelisMentenSteadyStateOptions> =
  Object.freeze({ relativeTolerance: 1e-6, maxSimulationHours: 2 * 365 * 24, profileStep: 0.05 });

/** Result of `michaelisMentenRegimenSteadyState`. */
export type MichaelisMentenSteadyStateResult =
  | {
      readonly outcome: 'no-steady-state';
      /** Input rate of active drug, mg/h. */
      readonly inputRate: number;
      readonly vmax: number;
      readonly message: string;
    }
  | {
      readonly outcome: 'steady-state' | 'not-converged';
      /** Input rate of active drug, mg/h (R = S·F·dose/τ). */
      readonly inputRate: number;
      readonly vmax: number;
      /** Closed-form Km·R/(Vmax − R), mg/L. */
      readonly css: number;
      /** Time to 90 % of Css from C = 0 (A8), h. */
      readonly time90: number;
      /** Simulated pre-dose concentration at steady state, mg/L. */
      readonly trough: number;
      /** Simulated interval maximum at steady state, mg/L, and its time after the dose start, h. */
      readonly peak: number;
      readonly peakTime: number;
      /** Simulated AUCτ/τ, mg/L. */
      readonly average: number;
      /** Simulated AUC over 24 h at steady state (AUCτ·24/τ), mg·h/L. */
      readonly auc24: number;
      /** Hours simulated to reach steady state. */
      readonly simulatedHours: number;
      /** Estimated remaining relative distance from steady state at the end of the run. */
      readonly remainingError: number;
      readonly rk4Steps: number;
    };

/**
 * Steady state of a one-compartment Michaelis-Menten regimen: closed-form Css and t90, simulated interval
 * peak/trough/average. `parameters` need V1, Vmax (mg/h), Km (mg/L), and ka (F, tlag) for oral doses.
 * @throws EngineError `invalid-input` (two compartments, non-positive dose or interval).
 * @example michaelisMentenRegimenSteadyState({ compartments: 1, elimination: 'michaelis-menten' },
 *   { V1: 49, Vmax: 415 / 24, Km: 5.7 }, { amount: 300, interval: 24, route: 'continuous' }).css // => 14.87
 */
export function michaelisMentenRegimenSteadyState(
  model: ModelStructure,
  parameters: PkParameters,
  dosing: MichaelisMentenDosing,
  options?: Partial<MichaelisMentenSteadyStateOptions>,
): MichaelisMentenSteadyStateResult {
  const fn = 'michaelisMentenRegimenSteadyState';
  const o = { ...michaelisMentenSteadyStateDefaultOptions, ...(options ?? {}) };
  if (model?.elimination !== 'michaelis-menten' || model.compartments !== 1) {
    throw new EngineError(
      'invalid-input',
      `${fn}: only one-compartment Michaelis-Menten models are supported`,
      'model',
    );
  }
  const { amount, interval: tau } = dosing;
  if (!(amount > 0) || !(tau > 0))
    throw new EngineError('invalid-input', `${fn}: amount and interval must be positive`, 'dosing');
  const S = dosing.saltFactor ?? 1;
  if (!(S > 0 && S <= 1))
    throw new EngineError('invalid-input', `${fn}: saltFactor must be in (0, 1]`, 'saltFactor');
  const V = parameters.V1;
  const vmax = parameters.Vmax;
  const km = parameters.Km;
  if (!(V! > 0) || !(vmax! > 0) || !(km! > 0))
    throw new EngineError('invalid-input', `${fn}: V1, Vmax and Km must be positive`, 'parameters');
  const F = dosing.route === 'oral' ? (parameters.F ?? 1) : 1;
  const active = S * amount;
  const R = (F * active) / tau;
  if (R >= vmax!) {
    return {
      outcome: 'no-steady-state',
      inputRate: R,
      vmax: vmax!,
      message: `Input ${(R * 24).toFixed(1)} mg/day of active drug is at or above Vmax ${(vmax! * 24).toFixed(1)} mg/day: elimination saturates and the level rises without a plateau.`,
    };
  }
  const css = michaelisMentenSteadyState(vmax!, km!, R);
  const time90 = michaelisMentenTime90(vmax!, km!, V, R);
  if (dosing.route === 'continuous') {
    return {
      outcome: 'steady-state',
      inputRate: R,
      vmax: vmax!,
      css,
      time90,
      trough: css,
      peak: css,
      peakTime: 0,
      average: css,
      auc24: css * 24,
      simulatedHours: 0,
      remainingError: 0,
      rk4Steps: 0,
    };
  }
  // Highest expected level: Css plus one whole dose in V (an upper bound of the swing).
  const cHigh = css + (F * active) / V;
  const kSlow = (vmax! * km!) / (V * (km! + cHigh) ** 2);
  // Approach error shrinks at least as e^(−k_slow t); the start at Css is within one dose swing of the cycle.
  const start0 = Math.log(Math.max(2, (F * active) / V / css / o.relativeTolerance)) / kSlow;
  const nBefore = Math.max(3, Math.ceil(Math.min(start0, o.maxSimulationHours) / tau));
  const last = nBefore * tau;
  const doses: Dose[] = [{ time: 0, amount: V * css, route: 'bolus' }];
  const T = dosing.route === 'infusion' ? (dosing.infusionDuration ?? 0) : 0;
  if (dosing.route === 'infusion' && !(T > 0 && T < tau))
    throw new EngineError(
      'invalid-input',
      `${fn}: infusionDuration must be in (0, interval)`,
      'dosing.infusionDuration',
    );
  for (let i = 0; i <= nBefore; i++) {
    doses.push(
      dosing.route === 'oral'
        ? { time: i * tau, amount: active, route: 'oral' }
        : { time: i * tau, amount: active, route: 'infusion', duration: T },
    );
  }
  const nOut = Math.max(24, Math.ceil(tau / o.profileStep));
  const times: number[] = [last - tau];
  for (let j = 0; j <= nOut; j++) times.push(last + (j * tau) / nOut);
  if (T > 0) times.push(last + T);
  const sim = simulate({
    model,
    parameters,
    doses,
    outputTimes: times,
    aucWindows: [[last, last + tau]],
    options: { estimateError: false },
  });
  const c = sim.concentrations;
  let peak = -Infinity;
  let peakTime = 0;
  for (let j = 1; j < times.length; j++) {
    if (c[j]! > peak) {
      peak = c[j]!;
      peakTime = times[j]! - last;
    }
  }
  const trough = c[nOut + 1]!; // at last + τ: the next dose has started but not yet raised C
  const prevTrough = c[0]!;
  // Troughs two intervals apart: δ(n−2) − δ(n) = δ(n)·(1/q² − 1), q = e^(−k_slow τ) per interval.
  const q2 = Math.exp(-2 * kSlow * tau);
  const remainingError = (Math.abs(trough - prevTrough) / trough) * (q2 / (1 - q2));
  const aucTau = sim.aucs[0]!;
  return {
    outcome:
      remainingError <= Math.max(o.relativeTolerance * 100, 1e-4)
        ? 'steady-state'
        : 'not-converged',
    inputRate: R,
    vmax: vmax!,
    css,
    time90,
    trough,
    peak,
    peakTime,
    average: aucTau / tau,
    auc24: (aucTau * 24) / tau,
    simulatedHours: last + tau,
    remainingError,
    rk4Steps: sim.counters.steps,
  };
}
