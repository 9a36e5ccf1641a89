/**
 * @ebbtide/kinetics/node — Node-only helpers (worker threads). Never import this from browser code;
 * the main entry `@ebbtide/kinetics` stays free of Node built-ins.
 */
export {
  createPtaPool,
  probabilityOfTargetAttainmentInPool,
  type PtaPool,
  type PtaPoolOptions,
} from './pta/node-pool';
