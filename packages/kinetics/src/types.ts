/**
 * Core data types shared by every engine module.
 * Units throughout: mg (amounts), L (volumes), h (times), L/h (clearances), mg/h (Vmax, rates),
 * mg/L (concentrations), 1/h (rate constants), mg·h/L (AUC).
 */

/** How a dose enters the body. `oral` also covers IM or any first-order absorption site. */
export type Route = 'bolus' | 'infusion' | 'oral';

/** Elimination from the central compartment. */
export type Elimination = 'linear' | 'michaelis-menten';

/** The structure of a compartment model: how many compartments and how drug leaves the central one. */
export interface ModelStructure {
  readonly compartments: 1 | 2;
  readonly elimination: Elimination;
}

/**
 * Primary pharmacokinetic parameters. Micro-constants (k10, k12, k21) are always derived, never stored.
 * Which fields are required depends on the model and routes (see `validateParameters`); unused ones may be omitted.
 */
export interface PkParameters {
  /** Clearance from the central compartment, L/h (linear elimination). */
  readonly CL?: number;
  /** Central volume, L (the only volume of a one-compartment model). */
  readonly V1: number;
  /** Inter-compartmental clearance, L/h (two compartments). */
  readonly Q?: number;
  /** Peripheral volume, L (two compartments). */
  readonly V2?: number;
  /** First-order absorption rate constant, 1/h (oral/IM doses). */
  readonly ka?: number;
  /** Bioavailability of oral/IM doses, fraction in (0, 1]; default 1. */
  readonly F?: number;
  /** Absorption lag time, h (oral/IM doses); default 0. */
  readonly tlag?: number;
  /** Maximum elimination rate, mg/h (Michaelis-Menten). */
  readonly Vmax?: number;
  /** Michaelis constant, mg/L (Michaelis-Menten). */
  readonly Km?: number;
}

/** One dose as recorded: start time (h), amount (mg), route and, for infusions, duration (h). */
export interface Dose {
  readonly time: number;
  readonly amount: number;
  readonly route: Route;
  /** Infusion duration, h; required (> 0) for `infusion`, ignored otherwise. */
  readonly duration?: number;
}
