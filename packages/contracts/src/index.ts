/**
 * @ebbtide/contracts — zod schemas and types for the payloads the API and the web client share.
 * One module per resource; re-export each here.
 */
export * from './errors';
export * from './roles';
