import knexFactory, { type Knex } from 'knex';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { knexConfig } from '../src/data-access/knex-config';

// A scratch database of its own, so rolling back cannot disturb the other suites.
const baseUrl = new URL(process.env.DATABASE_URL ?? 'postgres://postgres@127.0.0.1:54329/ebbtide');
const scratchName = `ebbtide_migrations_${process.pid}_${Date.now()}`;
let admin: Knex;
let scratch: Knex;

beforeAll(async () => {
  const adminUrl = new URL(baseUrl);
  adminUrl.pathname = '/postgres';
  admin = knexFactory({ client: 'pg', connection: adminUrl.toString() });
  await admin.raw(`create database "${scratchName}"`);
  const scratchUrl = new URL(baseUrl);
  scratchUrl.pathname = `/${scratchName}`;
  scratch = knexFactory(knexConfig(scratchUrl.toString()));
});

afterAll(async () => {
  await scratch?.destroy();
  await admin?.raw(`drop database if exists "${scratchName}" with (force)`);
  await admin?.destroy();
});

async function tableNames(db: Knex): Promise<string[]> {
  const result = await db.raw(
    "select tablename from pg_tables where schemaname = 'public' and tablename not like 'knex_%' order by 1",
  );
  return (result.rows as Array<{ tablename: string }>).map((r) => r.tablename);
}

describe('migrations', () => {
  it('run forward, all the way back, and forward again cleanly', async () => {
    await scratch.migrate.latest();
    const forward = await tableNames(scratch);
    expect(forward).toEqual(expect.arrayContaining(['audit_events', 'sessions']));

    await scratch.migrate.rollback(undefined, true);
    expect(await tableNames(scratch)).toEqual([]);

    await scratch.migrate.latest();
    expect(await tableNames(scratch)).toEqual(forward);
  });
});
