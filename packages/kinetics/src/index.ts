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

// Estimation, regimen design, PTA and sampling suggestion.
export type {
  DoseLike,
  EngineWarning,
  MeasuredLevel,
  PopulationPrior,
  ResidualErrorModel,
} from './estimation/types';
export {
  twoLevelEstimate,
  designPeakTroughRegimen,
  twoLevelDefaultOptions,
  type TwoLevelForm,
  type TwoLevelOptions,
  type TwoLevelRefusal,
  type TwoLevelResult,
} from './estimation/two-level';
export {
  assessLevels,
  levelRulesDefault,
  levelRulesByDrug,
  type LevelAssessment,
  type LevelRules,
  type MethodUse,
} from './estimation/level-validity';
export {
  fitMap,
  populationPrediction,
  mapFitDefaultOptions,
  type LevelFit,
  type MapFitInput,
  type MapFitOptions,
  type MapFitResult,
} from './estimation/map-fit';
export {
  nelderMead,
  nelderMeadDefaultOptions,
  type NelderMeadOptions,
  type NelderMeadResult,
} from './estimation/nelder-mead';
export { normalCdf, logNormalCdf } from './estimation/normal';
export {
  exponentialModel,
  superposedConcentrations,
  superposedAuc,
  steadyStateConcentration,
  type ExponentialModel,
} from './regimen/linear-response';
export {
  findRegimens,
  regimenPresets,
  regimenSearchDefaultOptions,
  type RegimenCandidate,
  type RegimenSearchOptions,
  type RegimenSearchResult,
} from './regimen/finder';
export {
  targetsMet,
  targetDistance,
  type Exposure,
  type ExposureTarget,
  type Range,
} from './regimen/targets';
export {
  probabilityOfTargetAttainment,
  mergePtaResults,
  ptaChunks,
  type PtaInput,
  type PtaRegimen,
  type PtaRegimenResult,
  type PtaResult,
  type PtaSource,
} from './pta/pta';
export { mulberry32, streamSeed, hash32, fillStandardNormals } from './pta/random';
export {
  suggestSamplingTimes,
  samplingDefaultOptions,
  type DesignValue,
  type DrawTime,
  type SamplingOptions,
  type SamplingSuggestion,
} from './sampling/suggest';
export {
  drugModelLibrary,
  vancomycinGoti2018,
  gentamicinExtendedInterval,
  tobramycinExtendedInterval,
  amikacinExtendedInterval,
  phenytoinGrasela1983,
} from './library/drug-models';
export type {
  DrugModelEntry,
  LibraryParameterName,
  ParameterSpec,
  VariabilitySpec,
  ResidualErrorSpec,
  CovariateSpec,
  PracticalSettings,
  TargetSpec,
  Provenance,
} from './library/types';
export {
  compileCovariateExpression,
  ALLOWED_FUNCTIONS,
  type CompiledExpression,
} from './library/expression';
export {
  validateDrugModel,
  isValidDrugModel,
  type EntryProblem,
  type EntryValidation,
} from './library/validate-entry';
export {
  individualParameters,
  populationPriorFromLibrary,
  omegaFromCv,
  type CovariateValues,
  type IndividualParameters,
  type LibraryPrior,
  type LibraryWarning,
} from './library/individual';
export { generateRegimen, type RegimenSpec } from './dosing/regimen';
export {
  ORAL_LOADING_PORTION_MG,
  ORAL_LOADING_SPACING_H,
  maintenanceAfterPortions,
  oralLoadingPortions,
  type LoadingPortion,
} from './dosing/oral-loading';
export { validateDoses } from './dosing/validate-doses';
export {
  halfLives,
  accumulationFactor,
  steadyStateProgress,
  dosingIntervalMetrics,
  timeAboveThreshold,
  steadyStateMetrics,
  auc24,
  METRICS_RESOLUTION,
  type HalfLives,
  type IntervalMetrics,
  type ProfileInput,
  type SteadyStateMetrics,
  type SteadyStateProgress,
  type ThresholdTimes,
} from './metrics/metrics';

// Regimen kinds beyond intermittent infusion: oral/IM, continuous infusion, Michaelis-Menten (phenytoin).
export type { RegimenKind, RefusedRegimen, RegimenSearchInput } from './regimen/finder';
export { averageConcentration } from './regimen/targets';
export {
  steadyStateOralConcentration,
  oralSteadyStateTmax,
  oralSteadyStatePeak,
  maximiseOnInterval,
} from './regimen/linear-response';
export {
  michaelisMentenRegimenSteadyState,
  michaelisMentenSteadyStateDefaultOptions,
  type MichaelisMentenDosing,
  type MichaelisMentenSteadyStateOptions,
  type MichaelisMentenSteadyStateResult,
} from './regimen/michaelis-menten-steady-state';
export {
  suggestSteadyStateTrough,
  type SteadyStateTroughInput,
  type SteadyStateTroughSuggestion,
} from './sampling/steady-state-trough';
