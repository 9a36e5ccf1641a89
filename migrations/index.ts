import type { Knex } from 'knex';
import * as m20261202000100 from './20261202000100_sessions_and_audit';
import * as m20261202010000 from './20261202010000_users';
import * as m20261202020001 from './20261202020001_casework';
import * as m20261202030000 from './20261202030000_mail_outbox';
import * as m20261202040000 from './20261202040000_plans_and_teaching';

/**
 * Every migration, in order. Knex's directory loader cannot import .ts files under vitest,
 * so the list is explicit: add each new migration here.
 */
const migrations: Record<string, Knex.Migration> = {
  '20261202000100_sessions_and_audit': m20261202000100,
  '20261202010000_users': m20261202010000,
  '20261202020001_casework': m20261202020001,
  '20261202030000_mail_outbox': m20261202030000,
  '20261202040000_plans_and_teaching': m20261202040000,
};

export const migrationSource: Knex.MigrationSource<string> = {
  getMigrations: async () => Object.keys(migrations).sort(),
  getMigrationName: (name) => name,
  getMigration: async (name) => {
    const migration = migrations[name];
    if (!migration) throw new Error(`Unknown migration ${name}`);
    return migration;
  },
};
