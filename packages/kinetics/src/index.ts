/**
 * @ebbtide/kinetics — the compartment-model engine.
 * Pure TypeScript: no DOM, no Node built-ins, no I/O.
 * Units inside the engine: mg, L, h, mg/L, L/h.
 */
export { creatinineMgDlFromUmolL, creatinineUmolLFromMgDl } from './covariates/creatinine-units';
export { EngineError } from './errors';
export type { Dose, Elimination, ModelStructure, PkParameters, Route } from './types';
export {
  simulate,
  concentrationsAt,
  defaultSimulateOptions,
  type SimulateInput,
  type SimulateOptions,
  type SimulateOutcome,
  type SimulateResult,
} from './simulate';
export {
  resolveModel,
  macroRateConstants,
  fastestRate,
  type ResolvedModel,
} from './models/parameters';
export {
  rk4Advance,
  createRk4Workspace,
  RK4_STABILITY_LIMIT,
  type OdeSystem,
  type Rk4Workspace,
} from './integrator/rk4';
export {
  closedFormConcentrations,
  closedFormAuc,
  closedFormPieces,
  closedFormSteadyState,
  closedFormSteadyStateAuc,
  type ExpTerm,
  type RepeatedDose,
  type ResponsePiece,
} from './closed-form/linear';
export {
  michaelisMentenSteadyState,
  michaelisMentenRateForTarget,
  michaelisMentenTime90,
  michaelisMentenWashoutTime,
} from './closed-form/michaelis-menten';
export {
  idealBodyWeightDevine,
  adjustedBodyWeight,
  bodyMassIndex,
  leanBodyWeightJanmahasatian,
  bsaMosteller,
  bsaDuBois,
} from './covariates/body-size';
export {
  cockcroftGault,
  egfrCkdEpi2021,
  egfrBedsideSchwartz,
  type CockcroftGaultInput,
  type CkdEpiInput,
  type SchwartzInput,
  type WeightBasis,
} from './covariates/renal';
export type { Sex } from './covariates/checks';
