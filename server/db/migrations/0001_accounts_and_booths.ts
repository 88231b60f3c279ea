import { sql, type Kysely } from 'kysely'

// Accounts, the shop's sites and booths, and the devices that publish for each booth.
export async function up(db: Kysely<unknown>): Promise<void> {
  await sql`
    CREATE TABLE users (
      id serial PRIMARY KEY,
      email text NOT NULL UNIQUE CHECK (email = lower(email)),
      name text NOT NULL,
      role text NOT NULL CHECK (role IN ('admin', 'manager', 'tech', 'painter', 'auditor')),
      password_hash text NOT NULL,
      must_change_password boolean NOT NULL DEFAULT false,
      pin_hash text,
      prefs jsonb NOT NULL DEFAULT '{}'::jsonb,
      disabled_at timestamptz,
      created_at timestamptz NOT NULL DEFAULT now(),
      updated_at timestamptz NOT NULL DEFAULT now()
    )`.execute(db)

  await sql`
    CREATE TABLE sites (
      id serial PRIMARY KEY,
      slug text NOT NULL UNIQUE CHECK (slug ~ '^[a-z0-9][a-z0-9-]{0,62}$'),
      name text NOT NULL,
      time_zone text NOT NULL DEFAULT 'UTC',
      units jsonb NOT NULL DEFAULT '{"temperature":"C","airflow":"m/s","pressure":"Pa"}'::jsonb,
      created_at timestamptz NOT NULL DEFAULT now()
    )`.execute(db)

  await sql`
    CREATE TABLE booths (
      id serial PRIMARY KEY,
      site_id integer NOT NULL REFERENCES sites(id),
      slug text NOT NULL CHECK (slug ~ '^[a-z0-9][a-z0-9-]{0,62}$'),
      name text NOT NULL,
      kind text NOT NULL CHECK (kind IN ('downdraft', 'semi_downdraft', 'crossdraft', 'prep_deck')),
      has_heater boolean NOT NULL DEFAULT true,
      created_at timestamptz NOT NULL DEFAULT now(),
      UNIQUE (site_id, slug)
    )`.execute(db)

  await sql`
    CREATE TABLE devices (
      id text PRIMARY KEY CHECK (id ~ '^[a-z0-9][a-z0-9-]{0,62}$'),
      booth_id integer NOT NULL REFERENCES booths(id),
      secret_hash text NOT NULL,
      revoked_at timestamptz,
      rotated_at timestamptz,
      last_status text,
      last_status_at timestamptz,
      created_at timestamptz NOT NULL DEFAULT now()
    )`.execute(db)
  await sql`CREATE INDEX devices_booth_idx ON devices (booth_id)`.execute(db)
}

export async function down(db: Kysely<unknown>): Promise<void> {
  await sql`DROP TABLE devices, booths, sites, users`.execute(db)
}
