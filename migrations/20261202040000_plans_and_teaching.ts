import type { Knex } from 'knex';

/**
 * Dosing plans and their signatures; teaching cases and trainees' practice plans.
 *
 * - `plans.content` is everything a signature vouches for (regimen, sampling, re-check time,
 *   rationale, target, engine inputs and outputs); `content_hash` is SHA-256 over its canonical
 *   JSON, recomputed by the API on every read so a change after signing shows.
 * - Plans belong to real courses only (`is_teaching` is false, kept in step with the course by
 *   the composite foreign key); trainees' work on teaching cases goes to `practice_plans`, which
 *   never reaches the sign-off queue.
 * - `plan_signatures` cannot be altered (UPDATE is refused; rows go only with their plan), and a plan has at most one
 *   countersignature (partial unique index), whatever two reviewers do at once.
 * - `teaching_cases.true_parameters` is the hidden patient a practice plan is scored against;
 *   the API never sends it to a trainee before scoring.
 */
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('plans', (t) => {
    t.uuid('id').primary().defaultTo(knex.raw('gen_random_uuid()'));
    t.integer('version').notNullable().defaultTo(1);
    t.uuid('course_id').notNullable();
    t.boolean('is_teaching').notNullable().defaultTo(false);
    t.integer('plan_number').notNullable();
    t.text('state').notNullable().defaultTo('draft');
    t.uuid('author_user_id').notNullable().references('users.id');
    t.uuid('supersedes_plan_id').references('plans.id');
    t.jsonb('content').notNullable();
    t.text('content_hash').notNullable();
    t.timestamp('recheck_at', { useTz: true });
    t.text('return_comment');
    t.timestamp('submitted_at', { useTz: true });
    t.timestamp('returned_at', { useTz: true });
    t.timestamp('countersigned_at', { useTz: true });
    t.timestamp('superseded_at', { useTz: true });
    t.timestamp('recheck_mailed_at', { useTz: true });
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.timestamp('updated_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.foreign(['course_id', 'is_teaching'])
      .references(['id', 'is_teaching'])
      .inTable('courses')
      .onDelete('CASCADE');
    t.unique(['course_id', 'plan_number']);
    t.index(['state', 'submitted_at']);
    t.index(['author_user_id']);
  });
  await knex.raw(`ALTER TABLE plans
    ADD CONSTRAINT plans_version_check CHECK (version >= 1),
    ADD CONSTRAINT plans_number_check CHECK (plan_number >= 1),
    ADD CONSTRAINT plans_real_course_check CHECK (NOT is_teaching),
    ADD CONSTRAINT plans_state_check CHECK (state IN ('draft','submitted','returned','countersigned','superseded')),
    ADD CONSTRAINT plans_hash_check CHECK (content_hash ~ '^[0-9a-f]{64}$'),
    ADD CONSTRAINT plans_submitted_check CHECK (state NOT IN ('submitted','countersigned','superseded') OR submitted_at IS NOT NULL),
    ADD CONSTRAINT plans_countersigned_check CHECK (state NOT IN ('countersigned','superseded') OR countersigned_at IS NOT NULL)`);

  await knex.schema.createTable('plan_signatures', (t) => {
    t.uuid('id').primary().defaultTo(knex.raw('gen_random_uuid()'));
    t.uuid('plan_id').notNullable().references('plans.id').onDelete('CASCADE');
    t.uuid('signer_user_id').notNullable().references('users.id');
    t.text('signer_name').notNullable();
    t.text('signer_role').notNullable();
    t.text('meaning').notNullable();
    t.timestamp('signed_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.text('content_hash').notNullable();
    t.text('comment');
    t.jsonb('checklist');
    /** When the signer last entered their credentials at the identity provider. */
    t.timestamp('authenticated_at', { useTz: true });
    t.index(['plan_id']);
  });
  await knex.raw(`ALTER TABLE plan_signatures
    ADD CONSTRAINT plan_signatures_meaning_check CHECK (meaning IN ('authored','reviewed-agree','returned')),
    ADD CONSTRAINT plan_signatures_hash_check CHECK (content_hash ~ '^[0-9a-f]{64}$')`);
  await knex.raw(
    "CREATE UNIQUE INDEX plan_signatures_one_countersignature ON plan_signatures (plan_id) WHERE meaning = 'reviewed-agree'",
  );
  await knex.raw(`
    CREATE FUNCTION plan_signatures_append_only() RETURNS trigger LANGUAGE plpgsql AS $$
    BEGIN
      RAISE EXCEPTION 'plan_signatures is append-only (% refused)', TG_OP USING ERRCODE = 'insufficient_privilege';
    END $$;
  `);
  await knex.raw(`
    CREATE TRIGGER plan_signatures_no_update
    BEFORE UPDATE ON plan_signatures
    FOR EACH ROW EXECUTE FUNCTION plan_signatures_append_only();
  `);

  await knex.schema.createTable('teaching_cases', (t) => {
    t.uuid('id').primary().defaultTo(knex.raw('gen_random_uuid()'));
    t.uuid('patient_id').notNullable();
    t.uuid('course_id').notNullable();
    t.boolean('is_teaching').notNullable().defaultTo(true);
    t.text('title').notNullable();
    t.text('summary').notNullable();
    /** Local clock hour (0–24) of the first dose, so relative hours read as "day 1 08:00". */
    t.double('first_dose_clock_h').notNullable().defaultTo(8);
    /** Hidden until scoring: [{ code, description }]. */
    t.jsonb('pitfalls').notNullable().defaultTo('[]');
    /** Hidden: the "true" patient the practice plans are scored against. */
    t.jsonb('true_parameters').notNullable();
    t.text('origin').notNullable().defaultTo('synthetic');
    t.uuid('created_by').references('users.id');
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.foreign(['patient_id', 'is_teaching'])
      .references(['id', 'is_teaching'])
      .inTable('patients')
      .onDelete('CASCADE');
    t.foreign(['course_id', 'is_teaching'])
      .references(['id', 'is_teaching'])
      .inTable('courses')
      .onDelete('CASCADE');
    t.unique(['course_id']);
  });
  await knex.raw(`ALTER TABLE teaching_cases
    ADD CONSTRAINT teaching_cases_teaching_check CHECK (is_teaching),
    ADD CONSTRAINT teaching_cases_clock_check CHECK (first_dose_clock_h >= 0 AND first_dose_clock_h < 24),
    ADD CONSTRAINT teaching_cases_origin_check CHECK (origin IN ('synthetic','anonymised-copy'))`);

  await knex.schema.createTable('practice_plans', (t) => {
    t.uuid('id').primary().defaultTo(knex.raw('gen_random_uuid()'));
    t.uuid('teaching_case_id').notNullable().references('teaching_cases.id').onDelete('CASCADE');
    t.uuid('user_id').notNullable().references('users.id');
    t.jsonb('regimen').notNullable();
    t.specificType('pitfalls_flagged', 'text[]').notNullable().defaultTo('{}');
    t.text('rationale').notNullable().defaultTo('');
    t.jsonb('basis').notNullable();
    t.jsonb('score').notNullable();
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.index(['teaching_case_id', 'user_id']);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTableIfExists('practice_plans');
  await knex.schema.dropTableIfExists('teaching_cases');
  await knex.schema.dropTableIfExists('plan_signatures');
  await knex.raw('DROP FUNCTION IF EXISTS plan_signatures_append_only()');
  await knex.schema.dropTableIfExists('plans');
}
