import type { Knex } from 'knex';
import type { Role } from '@ebbtide/contracts';

/** What the scoping helpers need to know about the caller: a plain object, never req. */
export interface ScopedActor {
  role: Role;
}

/** Roles that may see identifiable patients. Anything else sees teaching cases only. */
const SEES_IDENTIFIABLE_PATIENTS: ReadonlySet<Role> = new Set(['pharmacist', 'reviewer']);

/**
 * Confines a query to teaching cases for anyone who may not see identifiable patients
 * (the trainee, and, failing closed, any role not listed above, such as admin).
 *
 * Apply it to EVERY query that can return a patient or a row that belongs to one (courses,
 * doses, levels, plans joined to patients): the column names the boolean `is_teaching` of the
 * patients table as it appears in the query (default `patients.is_teaching`; pass the alias when
 * the query aliases the table). Route rules in entry-points/http/access.ts decide who may call a
 * route; this decides which rows they get, so a trainee can never receive an identifiable
 * patient whatever the URL.
 *
 * @example
 *   restrictToTeachingFor(actor, db('patients').where('patients.id', id)).first();
 *   restrictToTeachingFor(actor, db('levels').join('patients', ...), 'patients.is_teaching');
 * @returns the same query builder, for chaining.
 */
export function restrictToTeachingFor<Q extends Knex.QueryBuilder>(
  actor: ScopedActor,
  query: Q,
  column = 'patients.is_teaching',
): Q {
  if (!SEES_IDENTIFIABLE_PATIENTS.has(actor.role)) {
    query.where(column, true);
  }
  return query;
}

/** True when the actor may see identifiable (non-teaching) patients at all. */
export function seesIdentifiablePatients(actor: ScopedActor): boolean {
  return SEES_IDENTIFIABLE_PATIENTS.has(actor.role);
}
