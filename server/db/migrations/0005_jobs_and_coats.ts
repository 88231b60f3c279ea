import { sql, type Kysely } from 'kysely'

// Repair orders, their finish plans, the coats sprayed and the mixes made. Coats and mixes point at
// the spec revision they used; that revision is frozen from then on.
export async function up(db: Kysely<unknown>): Promise<void> {
  await sql`
    CREATE TABLE jobs (
      id serial PRIMARY KEY,
      number text NOT NULL UNIQUE,
      vehicle text NOT NULL,
      colour_code text NOT NULL DEFAULT '',
      panels text[] NOT NULL DEFAULT '{}',
      notes text NOT NULL DEFAULT '',
      painter_id integer REFERENCES users(id),
      booth_id integer REFERENCES booths(id),
      status text NOT NULL DEFAULT 'planned' CHECK (status IN ('planned', 'in_booth', 'curing', 'done')),
      created_by integer REFERENCES users(id),
      created_at timestamptz NOT NULL DEFAULT now(),
      updated_at timestamptz NOT NULL DEFAULT now()
    )`.execute(db)
  await sql`CREATE INDEX jobs_booth_status_idx ON jobs (booth_id, status)`.execute(db)

  await sql`
    CREATE TABLE job_steps (
      id serial PRIMARY KEY,
      job_id integer NOT NULL REFERENCES jobs(id) ON DELETE CASCADE,
      position integer NOT NULL,
      revision_id integer NOT NULL REFERENCES spec_revisions(id),
      coats_planned integer NOT NULL CHECK (coats_planned BETWEEN 1 AND 6),
      note text NOT NULL DEFAULT '',
      UNIQUE (job_id, position)
    )`.execute(db)

  await sql`
    CREATE TABLE coats (
      id serial PRIMARY KEY,
      job_id integer NOT NULL REFERENCES jobs(id),
      step_id integer NOT NULL REFERENCES job_steps(id),
      booth_id integer NOT NULL REFERENCES booths(id),
      coat_number integer NOT NULL,
      painter_id integer REFERENCES users(id),
      started_at timestamptz NOT NULL,
      finished_at timestamptz,
      overrides jsonb NOT NULL DEFAULT '[]'::jsonb,
      -- What the guard rails saw when the coat started (flash of the coat before, application window,
      -- condensation): the evidence of "flash waited vs required".
      start_check jsonb NOT NULL DEFAULT '{}'::jsonb,
      finished_by integer REFERENCES users(id),
      UNIQUE (step_id, coat_number),
      CHECK (finished_at IS NULL OR finished_at >= started_at)
    )`.execute(db)
  await sql`CREATE INDEX coats_job_idx ON coats (job_id, started_at)`.execute(db)
  // One coat in progress per booth at a time.
  await sql`CREATE UNIQUE INDEX coats_one_open_per_booth ON coats (booth_id) WHERE finished_at IS NULL`.execute(db)

  await sql`
    CREATE TABLE mixes (
      id serial PRIMARY KEY,
      booth_id integer NOT NULL REFERENCES booths(id),
      job_id integer REFERENCES jobs(id),
      step_id integer REFERENCES job_steps(id),
      revision_id integer NOT NULL REFERENCES spec_revisions(id),
      reducer_grade text,
      amount_ml real,
      painter_id integer REFERENCES users(id),
      mixed_at timestamptz NOT NULL,
      closed_at timestamptz,
      close_outcome text CHECK (close_outcome IN ('used', 'discarded')),
      closed_by integer REFERENCES users(id),
      -- Booth air temperature and the data sheet's reducer grade for it when the mix was logged.
      air_temp_c real,
      reducer_advised text,
      warnings jsonb NOT NULL DEFAULT '[]'::jsonb,
      CHECK ((closed_at IS NULL) = (close_outcome IS NULL))
    )`.execute(db)
  await sql`CREATE INDEX mixes_open_idx ON mixes (booth_id) WHERE closed_at IS NULL`.execute(db)

  // Pairing codes for booth screens: short-lived, single use, only a hash is kept.
  await sql`
    CREATE TABLE pairing_codes (
      id serial PRIMARY KEY,
      booth_id integer NOT NULL REFERENCES booths(id),
      code_hash text NOT NULL UNIQUE,
      created_by integer REFERENCES users(id),
      created_at timestamptz NOT NULL DEFAULT now(),
      expires_at timestamptz NOT NULL,
      used_at timestamptz
    )`.execute(db)
}

export async function down(db: Kysely<unknown>): Promise<void> {
  await sql`DROP TABLE pairing_codes, mixes, coats, job_steps, jobs`.execute(db)
}
