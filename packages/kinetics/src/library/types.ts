import type { ModelStructure, Route } from '../types';

/** Parameter names a library model may define (engine units: L/h, L, 1/h, fraction, h, mg/h, mg/L). */
export type LibraryParameterName = 'CL' | 'V1' | 'Q' | 'V2' | 'ka' | 'F' | 'tlag' | 'Vmax' | 'Km';

/** Every number in the library carries where it came from and whether it was recalled rather than read. */
export interface Provenance {
  /** Published source (authors, journal, year, table), or `common practice` when there is none. */
  readonly source: string;
  /** True when the value was recalled from memory and not checked against the source text. */
  readonly fromMemory: boolean;
}

/** Typical value and covariate relation of one parameter. */
export interface ParameterSpec extends Provenance {
  /** Typical value for the reference covariates, in engine units. */
  readonly typical: number;
  /** Engine unit, for display (e.g. `L/h`). */
  readonly unit: string;
  /**
   * Covariate relation as a restricted mathjs expression of `THETA` (= typical) and declared covariates,
   * e.g. `THETA * (CRCL / 120)^0.8 * 0.7^HD`. Absent: the parameter is `typical` for everyone.
   */
  readonly expression?: string;
}

/** Log-normal between-subject variability: give `omega` (SD of ln θ) or `cvPercent` (ω = √ln(1 + CV²)). */
export interface VariabilitySpec extends Provenance {
  readonly omega?: number;
  readonly cvPercent?: number;
}

/** Residual error: additive (mg/L), proportional (fraction, 0.15 = 15 %) or both combined. */
export interface ResidualErrorSpec extends Provenance {
  readonly model: 'additive' | 'proportional' | 'combined';
  readonly additive?: number;
  readonly proportional?: number;
}

/** A covariate the model uses, with the range the model was built on. */
export interface CovariateSpec extends Provenance {
  /** Symbol used in expressions, e.g. `CRCL`. */
  readonly name: string;
  readonly description: string;
  readonly unit: string;
  readonly min: number;
  readonly max: number;
}

/** The default exposure target the regimen finder aims at. */
export type TargetSpec =
  | ({
      readonly kind: 'auc24';
      readonly low: number;
      readonly high: number;
      readonly mic: number;
    } & Provenance)
  | ({
      readonly kind: 'peak-trough';
      /** Peak/MIC at least this. */
      readonly peakOverMic: number;
      readonly mic: number;
      /** Trough at most this, mg/L. */
      readonly troughMax: number;
    } & Provenance)
  | ({ readonly kind: 'concentration'; readonly low: number; readonly high: number } & Provenance);

/** Practical settings per drug (most are site-configurable). */
export interface PracticalSettings {
  /** Round doses to multiples of this, mg. */
  readonly doseRoundingMg: number;
  /** Maximum infusion rate, mg/h (null: no limit in this library). */
  readonly maxInfusionRateMgPerH: number | null;
  /** Usual dosing intervals, h. */
  readonly usualIntervalsH: readonly number[];
  /**
   * Intervals (h) given as a matter of course, a subset of `usualIntervalsH`: the regimen finder ranks the
   * others after these. Absent = no preference.
   */
  readonly preferredIntervalsH?: readonly number[];
  /** Largest single maintenance dose given as a matter of course, mg; larger ones rank after. */
  readonly usualMaxSingleDoseMg?: number;
  /** Oral loading doses are given in portions of at most this, mg, 2 h apart (phenytoin). */
  readonly oralLoadingPortionMg?: number;
  /** Usual infusion duration, h (IV drugs). */
  readonly defaultInfusionH?: number;
  /** Unit the assay reports: mg/L. */
  readonly assayUnit: 'mg/L';
  /** µmol/L per mg/L. */
  readonly siFactor: number;
  /**
   * Salt factor S: fraction of the dosed salt that is active drug (phenytoin sodium 0.92). The engine never
   * applies it: callers multiply the dose by S (and by F for oral doses, via parameters.F) themselves.
   */
  readonly saltFactor?: number;
  readonly target: TargetSpec;
  /** Provenance of the practical settings. */
  readonly sources: readonly string[];
}

/** One population model of the drug-model library: data only, no code. */
export interface DrugModelEntry {
  readonly id: string;
  readonly drug: string;
  readonly title: string;
  /** Who the model was built on (e.g. "hospitalised adults, with and without haemodialysis"). */
  readonly population: string;
  readonly structure: ModelStructure;
  readonly routes: readonly Route[];
  readonly parameters: Readonly<Partial<Record<LibraryParameterName, ParameterSpec>>>;
  readonly variability: Readonly<Partial<Record<LibraryParameterName, VariabilitySpec>>>;
  readonly residualError: ResidualErrorSpec;
  readonly covariates: readonly CovariateSpec[];
  readonly practical: PracticalSettings;
  /** Full references of the model. */
  readonly references: readonly string[];
  readonly notes?: string;
}
