/**
 * @ebbtide/contracts — zod schemas and types for the payloads the API and the web client share.
 * One module per resource; re-export each here.
 */
export * from './errors';
export * from './roles';
export * from './pagination';
export * from './patients';
export * from './covariates';
export * from './courses';
export * from './drug-models';
export * from './doses';
export * from './levels';
export * from './engine';
export * from './imports';
export * from './caseload';
export * from './plans';
export * from './teaching';
export * from './audit';
