/**
 * When to draw a phenytoin-like (Michaelis-Menten) level: a pre-dose trough once 90 % of steady state is
 * expected.
 *
 * With Michaelis-Menten elimination the "5 half-lives" rule does not apply (pk-reference E3); the time to reach
 * 90 % of Css from no drug under a constant input R is
 *   t90 = Km·V·(ln10·Vmax − 0.9·R)/(Vmax − R)²
 * (Winter ME, Basic Clinical Pharmacokinetics, phenytoin chapter — from memory, with ln 10 for the textbook's 2.3;
 * pk-reference A8), R = S·F·dose/τ. The suggested draw is the trough just before the first maintenance dose at
 * or after start + t90. The level predicted there comes from an RK4 run of the regimen from no drug (`simulate`);
 * the steady-state trough beside it from `michaelisMentenRegimenSteadyState`.
 */
import { EngineError } from '../errors';
import type { EngineWarning } from '../estimation/types';
import { michaelisMentenRegimenSteadyState } from '../regimen/michaelis-menten-steady-state';
import { simulate } from '../simulate';
import type { Dose, ModelStructure, PkParameters } from '../types';

/** The maintenance regimen the draw is planned for. */
export interface SteadyStateTroughInput {
  readonly model: ModelStructure;
  /** V1, Vmax (mg/h), Km (mg/L); ka, F (tlag) for oral doses. */
  readonly parameters: PkParameters;
  readonly regimen: {
    /** Dose as given (salt form), mg. */
    readonly amount: number;
    readonly interval: number;
    readonly route: 'oral' | 'infusion';
    /** Infusion time, h (route `infusion`). */
    readonly infusionDuration?: number;
    /** Time of the first maintenance dose, h (default 0). The regimen is assumed to start from no drug. */
    readonly start?: number;
  };
  /** Salt factor S (phenytoin sodium 0.92); default 1. */
  readonly saltFactor?: number;
  /** The trough is drawn this many h before the dose (common practice: within 0.5 h). Default 0.5. */
  readonly troughBeforeDose?: number;
}

export type SteadyStateTroughSuggestion =
  | {
      readonly outcome: 'no-steady-state';
      /** Active input rate, mg/h. */
      readonly inputRate: number;
      readonly warnings: EngineWarning[];
    }
  | {
      readonly outcome: 'draw';
      readonly inputRate: number;
      /** Closed-form Css = Km·R/(Vmax − R), mg/L. */
      readonly css: number;
      /** Time to 90 % of Css from no drug, h and days (A8). */
      readonly time90Hours: number;
      readonly time90Days: number;
      readonly draw: {
        /** Absolute time, h. */
        readonly time: number;
        /** Index of the maintenance dose (0 = first) the trough precedes, and its start time. */
        readonly beforeDoseNumber: number;
        readonly beforeDoseTime: number;
        /** Hours since the regimen started. */
        readonly hoursFromStart: number;
        /** RK4-predicted level at the draw, mg/L. */
        readonly predicted: number;
      };
      /** Steady-state trough of the regimen, mg/L, and the predicted level as a fraction of it. */
      readonly steadyStateTrough: number;
      readonly fractionOfSteadyStateTrough: number;
      readonly warnings: EngineWarning[];
    };

/**
 * Suggest the first meaningful steady-state trough of a Michaelis-Menten maintenance regimen.
 * @throws EngineError `invalid-input` (model, regimen).
 * @example suggestSteadyStateTrough({ model: { compartments: 1, elimination: 'michaelis-menten' },
 *   parameters: { V1: 49, Vmax: 415 / 24, Km: 5.7, ka: 0.3, F: 0.859 },
 *   regimen: { amount: 300, interval: 24, route: 'oral' }, saltFactor: 0.92 }).time90Days // => ≈ 6.5
 */
export function suggestSteadyStateTrough(
  input: SteadyStateTroughInput,
): SteadyStateTroughSuggestion {
  const fn = 'suggestSteadyStateTrough';
  if (input == null || typeof input !== 'object')
    throw new EngineError('invalid-input', `${fn}: input must be an object`, 'input');
  const { model, parameters, regimen } = input;
  if (model?.elimination !== 'michaelis-menten')
    throw new EngineError(
      'invalid-input',
      `${fn}: for linear models use suggestSamplingTimes`,
      'model.elimination',
    );
  const tau = regimen?.interval;
  if (!(regimen?.amount > 0) || !(tau! > 0))
    throw new EngineError(
      'invalid-input',
      `${fn}: regimen.amount and regimen.interval must be positive`,
      'regimen',
    );
  const start = regimen.start ?? 0;
  const S = input.saltFactor ?? 1;
  const before = input.troughBeforeDose ?? 0.5;
  if (!(before >= 0 && before < tau!))
    throw new EngineError(
      'invalid-input',
      `${fn}: troughBeforeDose must be in [0, interval)`,
      'troughBeforeDose',
    );
  const ss = michaelisMentenRegimenSteadyState(model, parameters, {
    amount: regimen.amount,
    interval: tau!,
    route: regimen.route,
    infusionDuration: regimen.infusionDuration,
    saltFactor: S,
  });
  if (ss.outcome === 'no-steady-state') {
    return {
      outcome: 'no-steady-state',
      inputRate: ss.inputRate,
      warnings: [
        {
          code: 'no-steady-state',
          message: `${ss.message} No steady-state level can be planned; lower the dose.`,
        },
      ],
    };
  }
  const n = Math.max(1, Math.ceil(ss.time90 / tau! - 1e-9));
  const doseTime = start + n * tau!;
  const drawTime = Math.max(start, doseTime - before);
  const doses: Dose[] = [];
  for (let i = 0; i <= n; i++) {
    const t = start + i * tau!;
    doses.push(
      regimen.route === 'oral'
        ? { time: t, amount: S * regimen.amount, route: 'oral' }
        : {
            time: t,
            amount: S * regimen.amount,
            route: 'infusion',
            duration: regimen.infusionDuration!,
          },
    );
  }
  const predicted = simulate({
    model,
    parameters,
    doses,
    outputTimes: [drawTime],
    options: { estimateError: false },
  }).concentrations[0]!;
  const warnings: EngineWarning[] = [
    {
      code: 't90-from-no-drug',
      message: `About ${(ss.time90 / 24).toFixed(1)} days to reach 90 % of steady state, counted from no drug. After a loading dose or a change from an earlier regimen the approach differs; a level drawn sooner under- or over-reads the steady state.`,
    },
  ];
  if (ss.outcome === 'not-converged') {
    warnings.push({
      code: 'steady-state-not-simulated',
      message: 'The steady-state trough is approximate: the simulation had not fully settled.',
    });
  }
  return {
    outcome: 'draw',
    inputRate: ss.inputRate,
    css: ss.css,
    time90Hours: ss.time90,
    time90Days: ss.time90 / 24,
    draw: {
      time: drawTime,
      beforeDoseNumber: n,
      beforeDoseTime: doseTime,
      hoursFromStart: drawTime - start,
      predicted,
    },
    steadyStateTrough: ss.trough,
    fractionOfSteadyStateTrough: predicted / ss.trough,
    warnings,
  };
}
