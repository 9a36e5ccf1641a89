/**
 * Runs the Knex migrations against DATABASE_URL.
 *   tsx scripts/db-migrate.ts latest | rollback-all | create-db <name> | drop-db <name>
 */
import knexFactory from 'knex';
import { knexConfig } from '../apps/api/src/data-access/knex-config';

const [command = 'latest', name] = process.argv.slice(2);
const url = process.env.DATABASE_URL ?? 'postgres://postgres@127.0.0.1:54329/ebbtide';

function adminUrl(): string {
  const u = new URL(url);
  u.pathname = '/postgres';
  return u.toString();
}

async function main(): Promise<void> {
  if (command === 'create-db' || command === 'drop-db') {
    if (!name || !/^[a-z_][a-z0-9_]*$/.test(name))
      throw new Error(`invalid database name: ${name}`);
    const admin = knexFactory({ client: 'pg', connection: adminUrl() });
    try {
      const exists = await admin.raw('select 1 from pg_database where datname = ?', [name]);
      if (command === 'create-db' && exists.rowCount === 0)
        await admin.raw(`create database "${name}"`);
      if (command === 'drop-db' && exists.rowCount > 0)
        await admin.raw(`drop database "${name}" with (force)`);
    } finally {
      await admin.destroy();
    }
    return;
  }
  const db = knexFactory(knexConfig(url));
  try {
    if (command === 'latest') {
      const [, applied] = await db.migrate.latest();
      console.log(applied.length ? `migrated: ${applied.join(', ')}` : 'migrations up to date');
    } else if (command === 'rollback-all') {
      const [, undone] = await db.migrate.rollback(undefined, true);
      console.log(`rolled back: ${undone.join(', ') || 'nothing'}`);
    } else {
      throw new Error(`unknown command ${command}`);
    }
  } finally {
    await db.destroy();
  }
}

main().catch((error: unknown) => {
  console.error(error instanceof Error ? error.message : error);
  process.exit(1);
});
