import { EngineError } from '../errors';
import type { PkParameters } from '../types';
import { compileCovariateExpression } from './expression';
import type { DrugModelEntry, LibraryParameterName } from './types';
import { validateDrugModel } from './validate-entry';

/** A caution that travels with a result (e.g. a covariate outside the model's range). */
export interface LibraryWarning {
  readonly code: string;
  readonly message: string;
}

/** Covariate values by symbol (e.g. `{ WT: 82, CRCL: 74, HD: 0 }`). */
export type CovariateValues = Readonly<Record<string, number>>;

/** Result of `individualParameters`. */
export interface IndividualParameters {
  /** Typical parameters for this patient, engine units. */
  readonly parameters: PkParameters;
  /** `covariate-out-of-range` for each covariate outside the range the model was built on. */
  readonly warnings: readonly LibraryWarning[];
}

function assertValid(entry: DrugModelEntry, fn: string): void {
  const v = validateDrugModel(entry);
  if (!v.ok) {
    const p = v.problems[0] as { field: string; message: string };
    throw new EngineError(
      'invalid-model',
      `${fn}: library entry is invalid: ${p.field} ${p.message}`,
      p.field,
    );
  }
}

/**
 * Typical parameters of one patient from a library model: each parameter's restricted mathjs covariate
 * relation (see `compileCovariateExpression`) evaluated with THETA = typical value and the patient's covariates.
 * Sources of the relations are in the entry data.
 * @throws {EngineError} `invalid-model` for an invalid entry; `invalid-input` naming a missing/non-finite covariate;
 *   `invalid-expression` when a relation gives a non-positive value.
 * @example individualParameters(vancomycinGoti2018, { CRCL: 120, WT: 70, HD: 0 }).parameters
 *   // => { CL: 4.5, V1: 58.4, Q: 6.5, V2: 38.4 }
 */
export function individualParameters(
  entry: DrugModelEntry,
  covariates: CovariateValues,
): IndividualParameters {
  const fn = 'individualParameters';
  assertValid(entry, fn);
  const warnings: LibraryWarning[] = [];
  for (const c of entry.covariates) {
    const v = covariates[c.name];
    if (typeof v !== 'number' || !Number.isFinite(v)) {
      throw new EngineError(
        'invalid-input',
        `${fn}: covariate ${c.name} (${c.unit}) must be a finite number (got ${String(v)})`,
        c.name,
      );
    }
    if (v < c.min || v > c.max) {
      warnings.push({
        code: 'covariate-out-of-range',
        message: `${c.name} = ${v} ${c.unit} is outside the range the model was built on (${c.min}–${c.max} ${c.unit})`,
      });
    }
  }
  const out: Partial<Record<LibraryParameterName, number>> = {};
  for (const [name, spec] of Object.entries(entry.parameters)) {
    if (!spec) continue;
    let value = spec.typical;
    if (spec.expression !== undefined) {
      const expr = compileCovariateExpression(spec.expression, `parameters.${name}.expression`, fn);
      value = expr.evaluate({ ...covariates, THETA: spec.typical });
    }
    if (!(value > 0) && !(name === 'tlag' && value === 0)) {
      throw new EngineError(
        'invalid-expression',
        `${fn}: parameters.${name} evaluates to ${value} for these covariates`,
        `parameters.${name}`,
      );
    }
    out[name as LibraryParameterName] = value;
  }
  return { parameters: out as PkParameters, warnings };
}

/** ω (SD of ln θ) from a CV: ω = √ln(1 + CV²) (log-normal; Beal SL, Sheiner LB, NONMEM Users Guide — from memory). */
export function omegaFromCv(cvPercent: number): number {
  const cv = cvPercent / 100;
  return Math.sqrt(Math.log(1 + cv * cv));
}

/** A population prior in the shape the estimation module consumes. */
export interface LibraryPrior {
  readonly typical: Readonly<Record<string, number>>;
  /** ω per parameter (SD of ln θ); parameters without variability are fixed. */
  readonly variability: Readonly<Record<string, number>>;
  /** Residual error: variance = additive² + (proportional·prediction)²; an unused part is 0. */
  readonly residualError: { readonly additive: number; readonly proportional: number };
}

/**
 * The patient's population prior from a library model: covariate-adjusted typical values, ω per parameter
 * (converted from CV % where the entry gives CV) and the residual error.
 * @throws {EngineError} as `individualParameters`.
 */
export function populationPriorFromLibrary(
  entry: DrugModelEntry,
  covariates: CovariateValues,
): { prior: LibraryPrior; warnings: readonly LibraryWarning[] } {
  const { parameters, warnings } = individualParameters(entry, covariates);
  const variability: Record<string, number> = {};
  for (const [name, v] of Object.entries(entry.variability)) {
    if (!v) continue;
    variability[name] = v.omega ?? omegaFromCv(v.cvPercent as number);
  }
  const re = entry.residualError;
  return {
    prior: {
      typical: { ...(parameters as unknown as Record<string, number>) },
      variability,
      residualError: {
        additive: re.model === 'proportional' ? 0 : (re.additive ?? 0),
        proportional: re.model === 'additive' ? 0 : (re.proportional ?? 0),
      },
    },
    warnings,
  };
}
