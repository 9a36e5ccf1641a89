import { z } from 'zod';

/**
 * Shared shapes for list endpoints, editable rows and clinical times.
 * Every list endpoint takes `page`, `pageSize`, `sort` and `order` and answers a `Page`.
 */

/** Query parameters of a paginated, sortable list (sort fields are per resource). */
export function listQuerySchema<const S extends readonly [string, ...string[]]>(
  sortFields: S,
  defaultSort: S[number],
) {
  return z.object({
    page: z.coerce.number().int().min(1).default(1),
    pageSize: z.coerce.number().int().min(1).max(100).default(25),
    sort: z.enum(sortFields).default(defaultSort as never),
    order: z.enum(['asc', 'desc']).default('asc'),
  });
}

/** A page of a list: `items` plus the paging echo and the total count. */
export function pageSchema<T extends z.ZodType>(item: T) {
  return z.object({
    items: z.array(item),
    page: z.number().int().min(1),
    pageSize: z.number().int().min(1),
    total: z.number().int().min(0),
  });
}
export interface Page<T> {
  items: T[];
  page: number;
  pageSize: number;
  total: number;
}

/** Every editable row carries a `version` for optimistic concurrency. */
export const versionSchema = z.number().int().min(1);

/** Body of an update or delete: the version the client last read. */
export const versionedWriteSchema = z.object({ version: versionSchema });
export type VersionedWrite = z.infer<typeof versionedWriteSchema>;

/**
 * The 409 body when an edit was made against a stale version: nothing was overwritten.
 * `current` is the row as it is now, so the client can show both versions.
 */
export const staleEditBodySchema = z.object({
  code: z.literal('stale-version'),
  message: z.string(),
  yourVersion: z.number().int(),
  currentVersion: z.number().int(),
  current: z.record(z.string(), z.unknown()),
  yours: z.record(z.string(), z.unknown()),
});
export type StaleEditBody = z.infer<typeof staleEditBodySchema>;

/** Where a row came from. */
export const rowSourceSchema = z.enum(['typed', 'csv', 'fhir', 'seed']);
export type RowSource = z.infer<typeof rowSourceSchema>;

/** An ISO 8601 date-time with an offset, e.g. 2026-12-01T08:00:00Z (real patients). */
export const isoDateTimeSchema = z.iso.datetime({ offset: true });

/**
 * A clinical time. Real patients use `at` (ISO date-time); teaching patients use `hour`,
 * hours relative to the first dose of the course (hour 0 = first dose; negative = before it).
 * Requests give exactly one of them; responses give both (one null).
 */
export const relativeHourSchema = z
  .number()
  .min(-24 * 365)
  .max(24 * 365);

export const uuidSchema = z.uuid();
export const idParamsSchema = z.object({ id: z.uuid() });
export type IdParams = z.infer<typeof idParamsSchema>;

/** A warning attached to a computed result; never silently extrapolate. */
export const warningSchema = z.object({
  code: z.string(),
  message: z.string(),
});
export type Warning = z.infer<typeof warningSchema>;
