import type { DrugModel } from '@ebbtide/contracts';
import { inTransaction, type Conn } from '../../data-access/casework-db';
import { syncEngineLibrary, type LibraryEntryLike } from './drug-models';

/**
 * Key of the PostgreSQL advisory lock that serialises library syncs across processes (any fixed
 * 64-bit number unique to this purpose; "ebbtide-library" hashed by hand).
 */
export const LIBRARY_SYNC_LOCK_KEY = 0x6562_6c69_62;

const isUniqueViolation = (error: unknown): boolean =>
  typeof error === 'object' && error !== null && (error as { code?: unknown }).code === '23505';

/**
 * Makes sure the engine's built-in drug-model library is in `drug_models` (version 1 of each
 * entry), so a freshly migrated database can run courses without the demo seed. Safe when several
 * API processes start at once: each takes a transaction-scoped advisory lock first, so one inserts
 * and the others then find the rows. A sync running outside the lock (the demo seed) can still
 * win an insert; the transaction then fails on the primary key and one retry finds the rows.
 */
export async function ensureEngineLibrary(
  db: Conn,
  library: Readonly<Record<string, LibraryEntryLike>>,
): Promise<DrugModel[]> {
  const once = () =>
    inTransaction(db, async (trx) => {
      await trx.raw('select pg_advisory_xact_lock(?)', [LIBRARY_SYNC_LOCK_KEY]);
      return syncEngineLibrary(trx, library);
    });
  try {
    return await once();
  } catch (error) {
    if (!isUniqueViolation(error)) throw error;
    return once();
  }
}
