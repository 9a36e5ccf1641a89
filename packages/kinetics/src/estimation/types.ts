/**
 * Shared shapes for estimation, regimen design, PTA and sampling suggestions.
 * Units: mg, L, h, mg/L, L/h.
 */

/** A caution that travels with a result. `code` is stable; `message` is for a pharmacist to read. */
export interface EngineWarning {
  readonly code: string;
  readonly message: string;
}

/**
 * A dose as given (structural subset of the engine's `Dose` in src/types.ts).
 * `time` h from the reference time, `amount` mg, `duration` h of a zero-order infusion
 * (0 or absent = bolus).
 */
export interface DoseLike {
  readonly time: number;
  readonly amount: number;
  readonly duration?: number;
  /** As in the engine's `Dose`; when given, `duration` counts only for `infusion`. */
  readonly route?: 'bolus' | 'infusion' | 'oral';
}

/** A measured level: `time` h, `value` mg/L. `lloq` mg/L is the assay's lower limit; `blq` marks a result reported "below limit". */
export interface MeasuredLevel {
  readonly time: number;
  readonly value: number;
  readonly lloq?: number;
  readonly blq?: boolean;
  /** What the ward called it; used only for the early-trough check. */
  readonly kind?: 'trough' | 'peak' | 'random';
}

/**
 * Residual error model, variance = additive² + (proportional·prediction)²
 * (the "combined" form; Beal SL, Sheiner LB et al., NONMEM Users Guide, Part V, 1989–2011 — from memory).
 * `additive` mg/L, `proportional` a fraction (0.15 = 15 %).
 */
export interface ResidualErrorModel {
  readonly additive: number;
  readonly proportional: number;
}

/**
 * Population prior for one patient: typical values already adjusted for the patient's covariates,
 * log-normal between-subject variability (omega = SD of ln parameter), and residual error.
 * A parameter with no omega (or omega 0) is fixed at its typical value.
 */
export interface PopulationPrior {
  readonly typical: Readonly<Record<string, number>>;
  readonly variability: Readonly<Record<string, number>>;
  readonly residualError: ResidualErrorModel;
}
