import type { Knex } from 'knex';
import type { ScopedActor } from './scope';
import { restrictToTeachingFor } from './scope';

/**
 * Shared plumbing of the casework repositories. `Conn` is opaque to the domain: it receives one
 * from `inTransaction` and hands it back to repository functions, never touching Knex itself.
 */
export type Conn = Knex | Knex.Transaction;

/** Runs `work` in one transaction: every write and its audit row commit together or not at all. */
export function inTransaction<T>(db: Conn, work: (trx: Conn) => Promise<T>): Promise<T> {
  return (db as Knex).transaction((trx) => work(trx));
}

export interface PageRequest {
  page: number;
  pageSize: number;
  order: 'asc' | 'desc';
}

/** Counts then fetches one page of `query` (which must not be ordered yet). */
export async function fetchPage<Row>(
  query: Knex.QueryBuilder,
  request: PageRequest,
  orderBy: Array<{ column: string; nulls?: 'first' | 'last' }>,
): Promise<{ rows: Row[]; total: number }> {
  const countRow = (await query
    .clone()
    .clearSelect()
    .clearOrder()
    .count<{ count: string }[]>({ count: '*' })
    .first()) as { count: string } | undefined;
  const page = query.clone();
  for (const o of orderBy) page.orderBy(o.column, request.order, o.nulls ?? 'last');
  const rows = (await page
    .limit(request.pageSize)
    .offset((request.page - 1) * request.pageSize)) as Row[];
  return { rows, total: Number(countRow?.count ?? 0) };
}

/** Confines a query on a casework table to teaching rows for actors who may not see real ones. */
export function scoped<Q extends Knex.QueryBuilder>(
  actor: ScopedActor,
  query: Q,
  table: string,
): Q {
  return restrictToTeachingFor(actor, query, `${table}.is_teaching`);
}

export type UpdateOutcome<Row> =
  { outcome: 'updated'; row: Row } | { outcome: 'stale'; current: Row } | { outcome: 'missing' };

/**
 * Optimistic update: applies `changes` only when the row still has `expectedVersion`,
 * bumping `version` and `updated_at`. A stale version leaves the row untouched.
 */
export async function updateVersioned<Row extends { version: number }>(
  conn: Conn,
  table: string,
  id: string,
  expectedVersion: number,
  changes: Record<string, unknown>,
): Promise<UpdateOutcome<Row>> {
  const [row] = (await conn(table)
    .where({ id, version: expectedVersion })
    .update({ ...changes, version: conn.raw('version + 1'), updated_at: conn.fn.now() })
    .returning('*')) as Row[];
  if (row) return { outcome: 'updated', row };
  const current = (await conn(table).where({ id }).forUpdate().first()) as Row | undefined;
  return current ? { outcome: 'stale', current } : { outcome: 'missing' };
}

/** Deletes a row only at `expectedVersion`. */
export async function deleteVersioned<Row extends { version: number }>(
  conn: Conn,
  table: string,
  id: string,
  expectedVersion: number,
): Promise<UpdateOutcome<Row>> {
  const [row] = (await conn(table)
    .where({ id, version: expectedVersion })
    .del()
    .returning('*')) as Row[];
  if (row) return { outcome: 'updated', row };
  const current = (await conn(table).where({ id }).first()) as Row | undefined;
  return current ? { outcome: 'stale', current } : { outcome: 'missing' };
}

/** PostgreSQL error classes the domain turns into field-level 400s. */
export function databaseErrorKind(
  error: unknown,
): { kind: 'unique' | 'check' | 'foreign-key'; constraint: string } | null {
  const e = error as { code?: string; constraint?: string };
  const constraint = e?.constraint ?? '';
  if (e?.code === '23505') return { kind: 'unique', constraint };
  if (e?.code === '23514') return { kind: 'check', constraint };
  if (e?.code === '23503') return { kind: 'foreign-key', constraint };
  return null;
}

export const iso = (d: Date | string | null | undefined): string | null =>
  d === null || d === undefined ? null : new Date(d).toISOString();
