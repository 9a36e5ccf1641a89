import type { Knex } from 'knex';

/**
 * Server-side sessions (the table layout connect-pg-simple expects) and the append-only audit trail.
 * The audit table refuses UPDATE and DELETE at the database level.
 */
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('sessions', (t) => {
    t.string('sid').primary();
    t.json('sess').notNullable();
    t.timestamp('expire', { precision: 6, useTz: true }).notNullable().index();
  });

  await knex.schema.createTable('audit_events', (t) => {
    t.bigIncrements('id').primary();
    t.timestamp('occurred_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.text('actor_subject'); // the identity provider's subject, null for the system
    t.text('actor_name');
    t.text('action').notNullable(); // e.g. "sign-in", "level.create"
    t.text('entity_type');
    t.text('entity_id');
    t.jsonb('before');
    t.jsonb('after');
    t.jsonb('context').notNullable().defaultTo('{}');
    t.index(['entity_type', 'entity_id']);
    t.index(['occurred_at']);
  });

  await knex.raw(`
    CREATE FUNCTION audit_events_append_only() RETURNS trigger LANGUAGE plpgsql AS $$
    BEGIN
      RAISE EXCEPTION 'audit_events is append-only (% refused)', TG_OP USING ERRCODE = 'insufficient_privilege';
    END $$;
  `);
  await knex.raw(`
    CREATE TRIGGER audit_events_no_update_delete
    BEFORE UPDATE OR DELETE ON audit_events
    FOR EACH ROW EXECUTE FUNCTION audit_events_append_only();
  `);
  await knex.raw(`
    CREATE TRIGGER audit_events_no_truncate
    BEFORE TRUNCATE ON audit_events
    FOR EACH STATEMENT EXECUTE FUNCTION audit_events_append_only();
  `);
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTableIfExists('audit_events');
  await knex.raw('DROP FUNCTION IF EXISTS audit_events_append_only()');
  await knex.schema.dropTableIfExists('sessions');
}
