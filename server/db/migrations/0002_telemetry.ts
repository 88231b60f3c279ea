import { sql, type Kysely } from 'kysely'
import { ROLLUP_CHANNELS } from '../channels'

// Time series. readings is range-partitioned by day on the device timestamp; partitions are made
// ahead by the partition keeper (server/telemetry/partitions.ts). The primary key makes a redelivered
// message (same booth, same device timestamp) a no-op.
export async function up(db: Kysely<unknown>): Promise<void> {
  await sql`
    CREATE TABLE readings (
      booth_id integer NOT NULL,
      ts timestamptz NOT NULL,
      received_at timestamptz NOT NULL DEFAULT now(),
      device_id text NOT NULL,
      seq bigint,
      air_temp_c real,
      rh_pct real,
      panel_temp_c real,
      airflow_mps real,
      booth_dp_pa real,
      intake_filter_dp_pa real,
      exhaust_filter_dp_pa real,
      heater_on boolean,
      dew_point_c real,
      PRIMARY KEY (booth_id, ts)
    ) PARTITION BY RANGE (ts)`.execute(db)
  await sql`CREATE INDEX readings_ts_brin ON readings USING brin (ts)`.execute(db)

  const rollupColumns = ROLLUP_CHANNELS.map(
    (c) => `${c}_min real, ${c}_max real, ${c}_sum double precision, ${c}_n integer NOT NULL DEFAULT 0`,
  ).join(',\n')
  await sql`
    CREATE TABLE readings_minute (
      booth_id integer NOT NULL,
      minute timestamptz NOT NULL,
      n integer NOT NULL,
      ${sql.raw(rollupColumns)},
      PRIMARY KEY (booth_id, minute)
    )`.execute(db)

  await sql`
    CREATE TABLE booth_modes (
      booth_id integer NOT NULL REFERENCES booths(id),
      ts timestamptz NOT NULL,
      mode text NOT NULL CHECK (mode IN ('idle', 'spray', 'flash', 'bake', 'cool')),
      PRIMARY KEY (booth_id, ts)
    )`.execute(db)

  // A bounded sample of what was refused, and exact counts per booth and reason.
  await sql`
    CREATE TABLE rejected_readings (
      id bigserial PRIMARY KEY,
      booth_id integer,
      topic text NOT NULL,
      reason text NOT NULL,
      detail text NOT NULL,
      payload text NOT NULL,
      received_at timestamptz NOT NULL DEFAULT now()
    )`.execute(db)
  await sql`CREATE INDEX rejected_readings_reason_idx ON rejected_readings (reason, id)`.execute(db)
  await sql`
    CREATE TABLE rejected_counts (
      booth_key text NOT NULL,
      reason text NOT NULL,
      count bigint NOT NULL,
      last_at timestamptz NOT NULL,
      PRIMARY KEY (booth_key, reason)
    )`.execute(db)
}

export async function down(db: Kysely<unknown>): Promise<void> {
  await sql`DROP TABLE rejected_counts, rejected_readings, booth_modes, readings_minute, readings`.execute(db)
}
