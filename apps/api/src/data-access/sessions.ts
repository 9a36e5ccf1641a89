import connectPgSimple from 'connect-pg-simple';
import session, { type Store } from 'express-session';
import type { Knex } from 'knex';

declare module 'express-session' {
  interface SessionData {
    /** users.id of the signed-in person; absent before sign-in. */
    userId: string;
    /** The ID token, kept for RP-initiated logout (id_token_hint). */
    idToken: string;
    /** When the person signed in (ISO). */
    signedInAt: string;
    /** Set between GET /auth/login and the callback: the PKCE verifier, state, nonce and return path. */
    pendingSignIn: { codeVerifier: string; state: string; nonce: string; returnTo: string };
  }
}

/** The table connect-pg-simple keeps sessions in (created by the first migration). */
export const SESSIONS_TABLE = 'sessions';

/**
 * The PostgreSQL session store, on the API's own Knex pool (no second pool to manage or close):
 * connect-pg-simple only calls `pool.query(text, params)`.
 */
export function createSessionStore(
  db: Knex,
  options: { pruneIntervalSeconds: number | false },
): Store {
  const PgStore = connectPgSimple(session);
  const pool = {
    async query(text: string, params?: unknown[]) {
      const connection = await db.client.acquireConnection();
      try {
        return await connection.query(text, params);
      } finally {
        await db.client.releaseConnection(connection);
      }
    },
  };
  return new PgStore({
    pool: pool as never,
    tableName: SESSIONS_TABLE,
    createTableIfMissing: false,
    pruneSessionInterval: options.pruneIntervalSeconds,
  });
}

/** How many sessions a user has (tests and the admin screen). */
export async function countSessionsOfUser(db: Knex, userId: string): Promise<number> {
  const row = await db(SESSIONS_TABLE)
    .whereRaw("sess->>'userId' = ?", [userId])
    .andWhere('expire', '>', db.fn.now())
    .count<{ count: string }[]>('* as count')
    .first();
  return Number(row?.count ?? 0);
}
