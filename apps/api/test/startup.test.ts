import { drugModelLibrary } from '@ebbtide/kinetics';
import { afterAll, describe, expect, it } from 'vitest';
import { createDb } from '../src/data-access/db';
import { ensureEngineLibrary } from '../src/domain/drug-models/library-at-startup';
import { startServer } from '../src/server';

const databaseUrl = process.env.DATABASE_URL;
if (!databaseUrl) throw new Error('DATABASE_URL is not set');
const db = createDb(databaseUrl);
afterAll(() => db.destroy());

const libraryIds = Object.values(drugModelLibrary).map((e) => e.id);

describe('startServer', () => {
  it('when two API processes start at once, then both come up and the library is in drug_models once', async () => {
    // Arrange: two servers on the same database, started together (RUN_WORKERS off: no SMTP).
    const options = { port: 0, nodeEnv: 'test', logLevel: 'silent', runWorkers: false } as const;
    // Act
    const [a, b] = await Promise.all([startServer(options), startServer(options)]);
    try {
      // Assert
      const rows = await db('drug_models').whereIn('id', libraryIds).where({ version: 1 });
      expect(rows.map((r: { id: string }) => r.id).sort()).toEqual([...libraryIds].sort());
      expect((await fetch(`${a.url}/api/health`)).status).toBe(200);
      expect((await fetch(`${b.url}/api/health`)).status).toBe(200);
    } finally {
      await Promise.all([a.stop(), b.stop()]);
    }
  });
});

describe('ensureEngineLibrary', () => {
  it('when called concurrently and again, then every call succeeds and each entry stays one row', async () => {
    // Act
    const results = await Promise.all(
      Array.from({ length: 4 }, () => ensureEngineLibrary(db, drugModelLibrary)),
    );
    await ensureEngineLibrary(db, drugModelLibrary);
    // Assert
    for (const r of results) expect(r.map((m) => m.id).sort()).toEqual([...libraryIds].sort());
    const counts = (await db('drug_models')
      .whereIn('id', libraryIds)
      .where({ version: 1 })
      .groupBy('id')
      .select('id')
      .count({ n: '*' })) as Array<{ n: string }>;
    expect(counts.every((c) => Number(c.n) === 1)).toBe(true);
  });
});
