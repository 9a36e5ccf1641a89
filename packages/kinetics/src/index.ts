/**
 * @ebbtide/kinetics — the compartment-model engine.
 * Pure TypeScript: no DOM, no Node built-ins, no I/O.
 * Units inside the engine: mg, L, h, mg/L, L/h.
 */
export { creatinineMgDlFromUmolL, creatinineUmolLFromMgDl } from './covariates/creatinine-units';
export { EngineError } from './errors';
