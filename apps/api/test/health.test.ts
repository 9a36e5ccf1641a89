import request from 'supertest';
import { afterAll, describe, expect, it } from 'vitest';
import { createTestApp } from './helpers';
import { createApp } from '../src/app';
import { loadConfig } from '../src/config';
import { createDb } from '../src/data-access/db';
import { createJobQueue } from '../src/jobs/queue';
import { createLogger } from '../src/lib/logger';

const { app, db } = createTestApp();
afterAll(() => db.destroy());

describe('GET /api/health', () => {
  it('when the database answers, then it reports ok, the version and a reachable database', async () => {
    const res = await request(app).get('/api/health');
    expect(res.status).toBe(200);
    expect(res.body).toMatchObject({ status: 'ok', database: { reachable: true } });
    expect(res.body.version).toMatch(/^\d+\.\d+\.\d+/);
  });

  it('when the database cannot be reached, then it reports degraded with 503', async () => {
    // Arrange: a port on loopback where nothing listens.
    const config = loadConfig(
      {},
      { logLevel: 'silent', databaseUrl: 'postgres://postgres@127.0.0.1:1/none' },
    );
    const deadDb = createDb(config.databaseUrl);
    // The queue stays unstarted: its database is the unreachable one and health never uses it.
    const boss = createJobQueue(config);
    const deadApp = createApp({ config, db: deadDb, logger: createLogger(config), boss });
    // Act
    const res = await request(deadApp).get('/api/health?timeoutMs=500');
    // Assert
    expect(res.status).toBe(503);
    expect(res.body).toMatchObject({ status: 'degraded', database: { reachable: false } });
    await deadDb.destroy();
  });

  it('when a query parameter is invalid, then it answers 400 with a field-level message', async () => {
    const res = await request(app).get('/api/health?timeoutMs=abc');
    expect(res.status).toBe(400);
    expect(res.body.code).toBe('validation-failed');
    expect(res.body.fieldErrors.timeoutMs).toBeDefined();
  });

  it('sets security headers', async () => {
    const res = await request(app).get('/api/health');
    expect(res.headers['x-content-type-options']).toBe('nosniff');
    expect(res.headers['content-security-policy']).toContain("default-src 'self'");
  });
});

describe('unknown routes', () => {
  it('when the route does not exist, then it answers a JSON 404', async () => {
    const res = await request(app).get('/api/no-such-thing');
    expect(res.status).toBe(404);
    expect(res.headers['content-type']).toMatch(/json/);
    expect(res.body).toEqual({
      code: 'route-not-found',
      message: 'No route for GET /api/no-such-thing',
    });
  });

  it('when the body is malformed JSON, then it answers 400 malformed-json', async () => {
    const res = await request(app)
      .post('/api/health')
      .set('content-type', 'application/json')
      .send('{"not json');
    expect(res.status).toBe(400);
    expect(res.body.code).toBe('malformed-json');
  });
});

describe('migrations', () => {
  it('the audit trail refuses UPDATE and DELETE', async () => {
    const [row] = await db('audit_events')
      .insert({ action: 'test.append-only', context: {} })
      .returning('id');
    await expect(db('audit_events').where({ id: row.id }).update({ action: 'x' })).rejects.toThrow(
      /append-only/,
    );
    await expect(db('audit_events').where({ id: row.id }).del()).rejects.toThrow(/append-only/);
  });
});
