import { sql, type Kysely } from 'kysely'

// Bake cycles and booth upkeep: bakes (opened by a tech or by the detector, linked to the jobs in the booth),
// filter changes, sensor calibrations (offsets applied at read time; stored readings are never rewritten),
// inspections, notes and service records, and the per-booth reminder rules that override the defaults.
export async function up(db: Kysely<unknown>): Promise<void> {
  await sql`
    CREATE TABLE bakes (
      id serial PRIMARY KEY,
      booth_id integer NOT NULL REFERENCES booths(id),
      state text NOT NULL CHECK (state IN ('detected', 'confirmed', 'signed_off', 'dismissed')),
      source text NOT NULL CHECK (source IN ('manual', 'mode', 'heater')),
      started_at timestamptz NOT NULL,
      ended_at timestamptz,
      end_source text CHECK (end_source IN ('manual', 'mode', 'heater')),
      target_temp_c real,
      notes text NOT NULL DEFAULT '',
      started_by integer REFERENCES users(id),
      confirmed_at timestamptz,
      confirmed_by integer REFERENCES users(id),
      ended_by integer REFERENCES users(id),
      signed_off_at timestamptz,
      signed_off_by integer REFERENCES users(id),
      sign_off_notes text NOT NULL DEFAULT '',
      dismiss_reason text,
      result jsonb,
      created_at timestamptz NOT NULL DEFAULT now(),
      updated_at timestamptz NOT NULL DEFAULT now(),
      CHECK (ended_at IS NULL OR ended_at >= started_at)
    )`.execute(db)
  // One running bake per booth: the detector and a tech starting one at the same moment cannot both win.
  await sql`CREATE UNIQUE INDEX bakes_one_running_per_booth ON bakes (booth_id) WHERE ended_at IS NULL`.execute(db)
  await sql`CREATE INDEX bakes_booth_started_idx ON bakes (booth_id, started_at DESC)`.execute(db)
  await sql`CREATE INDEX bakes_to_confirm_idx ON bakes (started_at) WHERE state = 'detected'`.execute(db)

  await sql`
    CREATE TABLE bake_jobs (
      bake_id integer NOT NULL REFERENCES bakes(id) ON DELETE CASCADE,
      job_id integer NOT NULL REFERENCES jobs(id),
      step_id integer REFERENCES job_steps(id),
      revision_id integer,
      PRIMARY KEY (bake_id, job_id)
    )`.execute(db)

  await sql`
    CREATE TABLE filter_changes (
      id serial PRIMARY KEY,
      booth_id integer NOT NULL REFERENCES booths(id),
      filter text NOT NULL CHECK (filter IN ('intake', 'exhaust')),
      changed_at timestamptz NOT NULL,
      dp_before_pa real,
      dp_after_pa real,
      notes text NOT NULL DEFAULT '',
      recorded_by integer REFERENCES users(id),
      created_at timestamptz NOT NULL DEFAULT now()
    )`.execute(db)
  await sql`CREATE INDEX filter_changes_booth_idx ON filter_changes (booth_id, filter, changed_at DESC)`.execute(db)

  await sql`
    CREATE TABLE calibrations (
      id serial PRIMARY KEY,
      booth_id integer NOT NULL REFERENCES booths(id),
      channel text NOT NULL CHECK (channel IN ('airTempC', 'rhPct', 'panelTempC', 'airflowMps', 'boothDpPa', 'intakeFilterDpPa', 'exhaustFilterDpPa')),
      effective_at timestamptz NOT NULL,
      reference_value double precision NOT NULL,
      sensor_value double precision NOT NULL,
      offset_value double precision NOT NULL,
      instrument text NOT NULL DEFAULT '',
      next_due_at timestamptz,
      notes text NOT NULL DEFAULT '',
      recorded_by integer REFERENCES users(id),
      created_at timestamptz NOT NULL DEFAULT now()
    )`.execute(db)
  await sql`CREATE INDEX calibrations_booth_channel_idx ON calibrations (booth_id, channel, effective_at)`.execute(db)

  await sql`
    CREATE TABLE inspections (
      id serial PRIMARY KEY,
      booth_id integer NOT NULL REFERENCES booths(id),
      inspected_at timestamptz NOT NULL,
      items jsonb NOT NULL,
      all_ok boolean NOT NULL,
      notes text NOT NULL DEFAULT '',
      recorded_by integer REFERENCES users(id),
      created_at timestamptz NOT NULL DEFAULT now()
    )`.execute(db)
  await sql`CREATE INDEX inspections_booth_idx ON inspections (booth_id, inspected_at DESC)`.execute(db)

  await sql`
    CREATE TABLE maintenance_notes (
      id serial PRIMARY KEY,
      booth_id integer NOT NULL REFERENCES booths(id),
      kind text NOT NULL CHECK (kind IN ('note', 'heater_service')),
      noted_at timestamptz NOT NULL,
      text text NOT NULL,
      recorded_by integer REFERENCES users(id),
      created_at timestamptz NOT NULL DEFAULT now()
    )`.execute(db)
  await sql`CREATE INDEX maintenance_notes_booth_idx ON maintenance_notes (booth_id, kind, noted_at DESC)`.execute(db)

  await sql`
    CREATE TABLE maintenance_rules (
      booth_id integer NOT NULL REFERENCES booths(id),
      task text NOT NULL CHECK (task IN ('intake_filter', 'exhaust_filter', 'inspection', 'heater_service')),
      interval_days real,
      interval_booth_hours real,
      interval_bake_cycles integer,
      dp_limit_pa real,
      trend_horizon_days real,
      updated_by integer REFERENCES users(id),
      updated_at timestamptz NOT NULL DEFAULT now(),
      PRIMARY KEY (booth_id, task)
    )`.execute(db)
}

export async function down(db: Kysely<unknown>): Promise<void> {
  await sql`DROP TABLE maintenance_rules, maintenance_notes, inspections, calibrations, filter_changes, bake_jobs, bakes`.execute(db)
}
