import type { Knex } from 'knex';

/**
 * The mail outbox: every e-mail the product sends is first a row here, written in the same
 * transaction as the change that causes it. A background job delivers it; the row stays until
 * the message is delivered. `idempotency_key` is unique, so the same event never enqueues twice.
 */
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('mail_outbox', (t) => {
    t.uuid('id').primary().defaultTo(knex.raw('gen_random_uuid()'));
    t.text('idempotency_key').notNullable().unique(); // e.g. "plan:<id>:submitted:v3"
    t.text('kind').notNullable(); // e.g. "plan.submitted", for logs and the catcher page
    t.specificType('to', 'text[]').notNullable();
    t.text('subject').notNullable();
    t.text('text_body').notNullable();
    t.text('html_body');
    t.text('status').notNullable().defaultTo('queued');
    t.integer('attempts').notNullable().defaultTo(0);
    t.text('last_error');
    t.text('message_id'); // the Message-ID header sent, fixed per row
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.timestamp('claimed_at', { useTz: true }); // when a worker took it for sending
    t.timestamp('sent_at', { useTz: true });
    t.index(['status', 'created_at']);
  });
  await knex.raw(`
    ALTER TABLE mail_outbox
      ADD CONSTRAINT mail_outbox_status_check
        CHECK (status IN ('queued', 'sending', 'sent', 'failed')),
      ADD CONSTRAINT mail_outbox_to_not_empty CHECK (cardinality("to") > 0),
      ADD CONSTRAINT mail_outbox_sent_at_check CHECK ((status = 'sent') = (sent_at IS NOT NULL))
  `);
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable('mail_outbox');
}
