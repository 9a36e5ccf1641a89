import type { Knex } from 'knex';

/**
 * Casework: the drug-model library, patients, covariate observations, therapy courses, doses
 * given, levels measured, and engine jobs (PTA runs).
 *
 * - Every editable row has `version` (optimistic concurrency: an update names the version it read).
 * - Teaching patients (`is_teaching`) have no MRN, name or date of birth (check constraint) and
 *   store times as hours relative to the first dose (`*_hour`), never real dates (`*_at`).
 *   `is_teaching` is copied down to courses, covariates, doses and levels through composite
 *   foreign keys (id, is_teaching), so the database itself keeps a row and its patient in step and
 *   a trainee-confining `where is_teaching` works on any table.
 * - Check constraints refuse physically implausible values in canonical units
 *   (kg, cm, umol/L creatinine, g/L albumin, mg doses, mg/L levels).
 */
const DRUGS = "('vancomycin','gentamicin','tobramycin','amikacin','phenytoin')";
const SOURCES = "('typed','csv','fhir','seed')";

export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('drug_models', (t) => {
    t.text('id').notNullable();
    t.integer('version').notNullable();
    t.text('drug').notNullable();
    t.text('name').notNullable();
    t.text('source').notNullable();
    t.jsonb('definition').notNullable();
    t.double('plausible_dose_min_mg').notNullable();
    t.double('plausible_dose_max_mg').notNullable();
    t.uuid('created_by').references('users.id');
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.primary(['id', 'version']);
  });
  await knex.raw(`ALTER TABLE drug_models
    ADD CONSTRAINT drug_models_drug_check CHECK (drug IN ${DRUGS}),
    ADD CONSTRAINT drug_models_version_check CHECK (version >= 1),
    ADD CONSTRAINT drug_models_dose_range_check CHECK (plausible_dose_min_mg > 0 AND plausible_dose_min_mg < plausible_dose_max_mg)`);

  await knex.schema.createTable('patients', (t) => {
    t.uuid('id').primary().defaultTo(knex.raw('gen_random_uuid()'));
    t.integer('version').notNullable().defaultTo(1);
    t.boolean('is_teaching').notNullable().defaultTo(false);
    t.text('mrn').unique();
    t.text('given_name');
    t.text('family_name');
    t.date('birth_date');
    t.text('teaching_label');
    t.integer('age_years');
    t.text('sex').notNullable();
    t.text('ward');
    t.uuid('created_by').references('users.id');
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.timestamp('updated_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.unique(['id', 'is_teaching']);
    t.index(['is_teaching']);
    t.index(['family_name']);
  });
  await knex.raw(`ALTER TABLE patients
    ADD CONSTRAINT patients_version_check CHECK (version >= 1),
    ADD CONSTRAINT patients_sex_check CHECK (sex IN ('female','male')),
    ADD CONSTRAINT patients_identity_check CHECK (
      (is_teaching AND mrn IS NULL AND given_name IS NULL AND family_name IS NULL AND birth_date IS NULL
        AND teaching_label IS NOT NULL AND age_years IS NOT NULL)
      OR (NOT is_teaching AND mrn IS NOT NULL AND given_name IS NOT NULL AND family_name IS NOT NULL
        AND birth_date IS NOT NULL AND teaching_label IS NULL AND age_years IS NULL)),
    ADD CONSTRAINT patients_age_check CHECK (age_years IS NULL OR age_years BETWEEN 0 AND 90),
    ADD CONSTRAINT patients_birth_date_check CHECK (birth_date IS NULL OR birth_date >= DATE '1900-01-01')`);

  await knex.schema.createTable('covariates', (t) => {
    t.uuid('id').primary().defaultTo(knex.raw('gen_random_uuid()'));
    t.integer('version').notNullable().defaultTo(1);
    t.uuid('patient_id').notNullable();
    t.boolean('is_teaching').notNullable();
    t.text('kind').notNullable();
    t.double('value');
    t.text('unit');
    t.double('canonical_value');
    t.text('weight_source');
    t.text('dialysis_status');
    t.timestamp('observed_at', { useTz: true });
    t.double('observed_hour');
    t.text('note');
    t.text('source').notNullable().defaultTo('typed');
    t.uuid('created_by').references('users.id');
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.timestamp('updated_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.foreign(['patient_id', 'is_teaching'])
      .references(['id', 'is_teaching'])
      .inTable('patients')
      .onDelete('CASCADE');
    t.index(['patient_id', 'kind']);
  });
  await knex.raw(`ALTER TABLE covariates
    ADD CONSTRAINT covariates_version_check CHECK (version >= 1),
    ADD CONSTRAINT covariates_kind_check CHECK (kind IN ('weight','height','serum-creatinine','albumin','dialysis')),
    ADD CONSTRAINT covariates_source_check CHECK (source IN ${SOURCES}),
    ADD CONSTRAINT covariates_time_check CHECK (
      (is_teaching AND observed_at IS NULL AND observed_hour IS NOT NULL)
      OR (NOT is_teaching AND observed_at IS NOT NULL AND observed_hour IS NULL)),
    ADD CONSTRAINT covariates_value_check CHECK (
      (kind = 'dialysis' AND dialysis_status IN ('none','intermittent-haemodialysis','continuous-rrt','peritoneal')
        AND value IS NULL AND canonical_value IS NULL)
      OR (kind <> 'dialysis' AND dialysis_status IS NULL AND value IS NOT NULL AND unit IS NOT NULL
        AND canonical_value IS NOT NULL)),
    ADD CONSTRAINT covariates_weight_source_check CHECK (
      (kind = 'weight' AND weight_source IN ('measured','stated','estimated'))
      OR (kind <> 'weight' AND weight_source IS NULL)),
    ADD CONSTRAINT covariates_plausible_check CHECK (
      (kind = 'weight' AND canonical_value BETWEEN 0.3 AND 350)
      OR (kind = 'height' AND canonical_value BETWEEN 25 AND 250)
      OR (kind = 'serum-creatinine' AND canonical_value BETWEEN 5 AND 2500)
      OR (kind = 'albumin' AND canonical_value BETWEEN 5 AND 70)
      OR kind = 'dialysis')`);
  await knex.raw(
    'CREATE UNIQUE INDEX covariates_no_duplicates ON covariates (patient_id, kind, observed_at, observed_hour) NULLS NOT DISTINCT',
  );

  await knex.schema.createTable('courses', (t) => {
    t.uuid('id').primary().defaultTo(knex.raw('gen_random_uuid()'));
    t.integer('version').notNullable().defaultTo(1);
    t.uuid('patient_id').notNullable();
    t.boolean('is_teaching').notNullable();
    t.text('drug').notNullable();
    t.text('model_id').notNullable();
    t.integer('model_version').notNullable();
    t.text('indication').notNullable();
    t.double('mic_mg_l');
    t.text('mic_method');
    t.text('target_metric').notNullable();
    t.double('target_low');
    t.double('target_high');
    t.text('status').notNullable().defaultTo('active');
    t.uuid('owner_user_id').references('users.id');
    t.timestamp('started_at', { useTz: true });
    t.double('started_hour');
    t.uuid('created_by').references('users.id');
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.timestamp('updated_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.foreign(['patient_id', 'is_teaching'])
      .references(['id', 'is_teaching'])
      .inTable('patients')
      .onDelete('CASCADE');
    t.foreign(['model_id', 'model_version']).references(['id', 'version']).inTable('drug_models');
    t.unique(['id', 'is_teaching']);
    t.index(['patient_id']);
    t.index(['owner_user_id', 'status']);
  });
  await knex.raw(`ALTER TABLE courses
    ADD CONSTRAINT courses_version_check CHECK (version >= 1),
    ADD CONSTRAINT courses_drug_check CHECK (drug IN ${DRUGS}),
    ADD CONSTRAINT courses_status_check CHECK (status IN ('active','on-hold','completed','stopped')),
    ADD CONSTRAINT courses_mic_check CHECK (mic_mg_l IS NULL OR (mic_mg_l > 0 AND mic_mg_l <= 1024)),
    ADD CONSTRAINT courses_target_check CHECK (
      target_metric IN ('auc24','trough','peak','peak-mic-ratio','css')
      AND (target_low IS NOT NULL OR target_high IS NOT NULL)
      AND (target_low IS NULL OR target_low > 0)
      AND (target_high IS NULL OR target_high > 0)
      AND (target_low IS NULL OR target_high IS NULL OR target_low < target_high)),
    ADD CONSTRAINT courses_time_check CHECK (NOT is_teaching OR started_at IS NULL)`);

  await knex.schema.createTable('doses', (t) => {
    t.uuid('id').primary().defaultTo(knex.raw('gen_random_uuid()'));
    t.integer('version').notNullable().defaultTo(1);
    t.uuid('course_id').notNullable();
    t.boolean('is_teaching').notNullable();
    t.double('amount').notNullable();
    t.text('unit').notNullable();
    t.double('amount_mg').notNullable();
    t.text('route').notNullable();
    t.timestamp('start_at', { useTz: true });
    t.double('start_hour');
    t.double('duration_h');
    t.text('administration_status').notNullable().defaultTo('given');
    t.text('note');
    t.text('source').notNullable().defaultTo('typed');
    t.uuid('created_by').references('users.id');
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.timestamp('updated_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.foreign(['course_id', 'is_teaching'])
      .references(['id', 'is_teaching'])
      .inTable('courses')
      .onDelete('CASCADE');
    t.index(['course_id']);
  });
  await knex.raw(`ALTER TABLE doses
    ADD CONSTRAINT doses_version_check CHECK (version >= 1),
    ADD CONSTRAINT doses_unit_check CHECK (unit IN ('mg','g')),
    ADD CONSTRAINT doses_amount_check CHECK (amount > 0 AND amount_mg > 0 AND amount_mg <= 20000
      AND amount_mg = CASE unit WHEN 'g' THEN amount * 1000 ELSE amount END),
    ADD CONSTRAINT doses_route_check CHECK (route IN ('iv-infusion','iv-bolus','oral','im')),
    ADD CONSTRAINT doses_duration_check CHECK (
      (route = 'iv-infusion' AND duration_h > 0 AND duration_h <= 48)
      OR (route <> 'iv-infusion' AND duration_h IS NULL)),
    ADD CONSTRAINT doses_status_check CHECK (administration_status IN ('given','missed','partial')),
    ADD CONSTRAINT doses_source_check CHECK (source IN ${SOURCES}),
    ADD CONSTRAINT doses_time_check CHECK (
      (is_teaching AND start_at IS NULL AND start_hour IS NOT NULL)
      OR (NOT is_teaching AND start_at IS NOT NULL AND start_hour IS NULL))`);
  await knex.raw(
    'CREATE UNIQUE INDEX doses_no_duplicates ON doses (course_id, start_at, start_hour) NULLS NOT DISTINCT',
  );

  await knex.schema.createTable('levels', (t) => {
    t.uuid('id').primary().defaultTo(knex.raw('gen_random_uuid()'));
    t.integer('version').notNullable().defaultTo(1);
    t.uuid('course_id').notNullable();
    t.boolean('is_teaching').notNullable();
    t.double('value').notNullable();
    t.text('unit').notNullable();
    t.double('value_mg_l').notNullable();
    t.timestamp('collected_at', { useTz: true });
    t.double('collected_hour');
    t.text('sample_kind').notNullable();
    t.text('fraction').notNullable().defaultTo('total');
    t.double('assay_lower_limit');
    t.text('loinc_code');
    t.specificType('flags', 'text[]').notNullable().defaultTo('{}');
    t.text('note');
    t.text('source').notNullable().defaultTo('typed');
    t.uuid('created_by').references('users.id');
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.timestamp('updated_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.foreign(['course_id', 'is_teaching'])
      .references(['id', 'is_teaching'])
      .inTable('courses')
      .onDelete('CASCADE');
    t.index(['course_id']);
  });
  await knex.raw(`ALTER TABLE levels
    ADD CONSTRAINT levels_version_check CHECK (version >= 1),
    ADD CONSTRAINT levels_unit_check CHECK (unit IN ('mg/L','ug/mL','umol/L')),
    ADD CONSTRAINT levels_value_check CHECK (value >= 0 AND value_mg_l >= 0 AND value_mg_l <= 500),
    ADD CONSTRAINT levels_kind_check CHECK (sample_kind IN ('trough','peak','random','during-infusion','pre-dialysis','post-dialysis')),
    ADD CONSTRAINT levels_fraction_check CHECK (fraction IN ('total','free')),
    ADD CONSTRAINT levels_lloq_check CHECK (assay_lower_limit IS NULL OR assay_lower_limit >= 0),
    ADD CONSTRAINT levels_source_check CHECK (source IN ${SOURCES}),
    ADD CONSTRAINT levels_time_check CHECK (
      (is_teaching AND collected_at IS NULL AND collected_hour IS NOT NULL)
      OR (NOT is_teaching AND collected_at IS NOT NULL AND collected_hour IS NULL))`);
  await knex.raw(
    'CREATE UNIQUE INDEX levels_no_duplicates ON levels (course_id, collected_at, collected_hour, fraction) NULLS NOT DISTINCT',
  );

  await knex.schema.createTable('engine_jobs', (t) => {
    t.uuid('id').primary().defaultTo(knex.raw('gen_random_uuid()'));
    t.text('kind').notNullable();
    t.uuid('course_id').notNullable().references('courses.id').onDelete('CASCADE');
    t.uuid('requested_by').references('users.id');
    t.text('state').notNullable().defaultTo('queued');
    t.double('progress').notNullable().defaultTo(0);
    t.jsonb('request').notNullable();
    t.jsonb('result');
    t.text('error');
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.timestamp('updated_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
  });
  await knex.raw(`ALTER TABLE engine_jobs
    ADD CONSTRAINT engine_jobs_state_check CHECK (state IN ('queued','running','completed','failed','cancelled')),
    ADD CONSTRAINT engine_jobs_progress_check CHECK (progress >= 0 AND progress <= 1)`);
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTableIfExists('engine_jobs');
  await knex.schema.dropTableIfExists('levels');
  await knex.schema.dropTableIfExists('doses');
  await knex.schema.dropTableIfExists('courses');
  await knex.schema.dropTableIfExists('covariates');
  await knex.schema.dropTableIfExists('patients');
  await knex.schema.dropTableIfExists('drug_models');
}
