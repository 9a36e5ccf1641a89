import knexFactory, { type Knex } from 'knex';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { kestrelBaySeeder } from '../../../scripts/seed/kestrel-bay';
import { knexConfig } from '../src/data-access/knex-config';

// A scratch database of its own: the demo data must never leak into other suites' rows.
const baseUrl = new URL(process.env.DATABASE_URL ?? 'postgres://postgres@127.0.0.1:54329/ebbtide');
const scratchName = `ebbtide_seed_${process.pid}_${Date.now()}`;
const scratchUrl = new URL(baseUrl);
scratchUrl.pathname = `/${scratchName}`;
let admin: Knex;
let db: Knex;

beforeAll(async () => {
  const adminUrl = new URL(baseUrl);
  adminUrl.pathname = '/postgres';
  admin = knexFactory({ client: 'pg', connection: adminUrl.toString() });
  await admin.raw(`create database "${scratchName}"`);
  db = knexFactory(knexConfig(scratchUrl.toString()));
  await db.migrate.latest();
}, 60_000);

afterAll(async () => {
  await db?.destroy();
  await admin?.raw(`drop database if exists "${scratchName}" with (force)`);
  await admin?.destroy();
});

describe('scripts/seed Kestrel Bay', () => {
  it('when run twice, then the second run creates nothing, and the scenario has what the demo needs', async () => {
    // Act
    const first = await kestrelBaySeeder.run({ databaseUrl: scratchUrl.toString(), quiet: true });
    const second = await kestrelBaySeeder.run({ databaseUrl: scratchUrl.toString(), quiet: true });
    // Assert
    expect(first).toBeGreaterThanOrEqual(9);
    expect(second).toBe(0);
    const real = await db('patients').where({ is_teaching: false });
    expect(real.length).toBeGreaterThanOrEqual(6);
    expect(new Set(real.map((p) => p.ward))).toEqual(
      new Set(['4 North', 'ICU', 'Renal unit', 'Paediatrics']),
    );
    const drugs = (await db('courses').where({ is_teaching: false }).distinct('drug')).map(
      (r) => r.drug,
    );
    expect(drugs).toEqual(
      expect.arrayContaining(['vancomycin', 'gentamicin', 'tobramycin', 'phenytoin']),
    );
    // One obese and one haemodialysis vancomycin course.
    const heavy = await db('covariates')
      .where({ kind: 'weight', is_teaching: false })
      .where('canonical_value', '>=', 120);
    expect(heavy.length).toBeGreaterThanOrEqual(1);
    expect(
      await db('covariates').where({
        kind: 'dialysis',
        dialysis_status: 'intermittent-haemodialysis',
      }),
    ).toHaveLength(1);
    // A late and a missed dose; a level drawn during an infusion; an early trough.
    expect(
      await db('doses').where({ administration_status: 'missed', is_teaching: false }),
    ).not.toHaveLength(0);
    expect(await db('doses').whereILike('note', '%late%')).not.toHaveLength(0);
    expect(await db('levels').whereRaw("'during-infusion' = any(flags)")).not.toHaveLength(0);
    expect(
      await db('levels').where({ sample_kind: 'trough' }).whereILike('note', '%early%'),
    ).not.toHaveLength(0);
    // Teaching patients: relative time only, no identifiers.
    const teaching = await db('patients').where({ is_teaching: true });
    expect(teaching.length).toBeGreaterThanOrEqual(3);
    expect(
      teaching.every((p) => p.mrn === null && p.family_name === null && p.birth_date === null),
    ).toBe(true);
    expect(
      await db('levels').where({ is_teaching: true }).whereNotNull('collected_at'),
    ).toHaveLength(0);
    // Courses are owned by the demo pharmacist's user row, keyed by the identity provider's subject.
    const owner = await db('users').where({ subject: 'kb-0001' }).first();
    expect(owner).toBeDefined();
    expect((await db('courses').where({ owner_user_id: owner.id })).length).toBeGreaterThanOrEqual(
      4,
    );
    // Every seeded level is in the present or past.
    expect(await db('levels').where('collected_at', '>', new Date())).toHaveLength(0);
  }, 60_000);
});
