import type { Knex } from 'knex';

/**
 * People who sign in, keyed by the identity provider's subject (`issuer` + `subject`).
 * A row is created at first sign-in. `role_source` says whether the role still follows the
 * provider's `roles` claim ('claim') or was set by an admin in Ebbtide ('admin'), in which case a
 * later sign-in does not overwrite it. The audit trail gains the acting user's id.
 */
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('users', (t) => {
    t.uuid('id').primary().defaultTo(knex.raw('gen_random_uuid()'));
    t.text('issuer').notNullable();
    t.text('subject').notNullable();
    t.text('display_name').notNullable();
    t.text('email');
    t.text('role').notNullable();
    t.text('role_source').notNullable().defaultTo('claim');
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.timestamp('updated_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.timestamp('last_sign_in_at', { useTz: true });
    t.unique(['issuer', 'subject']);
  });
  await knex.raw(
    "ALTER TABLE users ADD CONSTRAINT users_role_check CHECK (role IN ('pharmacist', 'reviewer', 'trainee', 'admin'))",
  );
  await knex.raw(
    "ALTER TABLE users ADD CONSTRAINT users_role_source_check CHECK (role_source IN ('claim', 'admin'))",
  );
  await knex.schema.alterTable('audit_events', (t) => {
    t.uuid('actor_user_id').references('users.id');
    t.index(['actor_user_id']);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.alterTable('audit_events', (t) => {
    t.dropColumn('actor_user_id');
  });
  await knex.schema.dropTableIfExists('users');
}
