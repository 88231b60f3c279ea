import { sql, type Kysely } from 'kysely'

// Products, their numbered spec revisions (frozen once a coat or mix uses them) and uploaded files
// (TDS PDFs, stored on disk by SHA-256). All values SI: °C, minutes, %, m/s.
export async function up(db: Kysely<unknown>): Promise<void> {
  await sql`
    CREATE TABLE files (
      sha256 text PRIMARY KEY CHECK (sha256 ~ '^[0-9a-f]{64}$'),
      size_bytes integer NOT NULL CHECK (size_bytes > 0),
      content_type text NOT NULL,
      original_name text NOT NULL CHECK (length(original_name) BETWEEN 1 AND 255),
      uploaded_by integer REFERENCES users(id),
      uploaded_at timestamptz NOT NULL DEFAULT now()
    )`.execute(db)

  await sql`
    CREATE TABLE products (
      id serial PRIMARY KEY,
      name text NOT NULL CHECK (length(name) BETWEEN 1 AND 120),
      category text NOT NULL CHECK (category IN ('primer_surfacer', 'sealer', 'wet_bed_binder', 'basecoat', 'clearcoat', 'other')),
      chemistry text NOT NULL CHECK (chemistry IN ('solvent', 'waterborne')),
      components smallint NOT NULL CHECK (components IN (1, 2)),
      notes text NOT NULL DEFAULT '',
      created_by integer REFERENCES users(id),
      created_at timestamptz NOT NULL DEFAULT now(),
      updated_at timestamptz NOT NULL DEFAULT now()
    )`.execute(db)
  await sql`CREATE UNIQUE INDEX products_name_key ON products (lower(name))`.execute(db)

  await sql`
    CREATE TABLE spec_revisions (
      id serial PRIMARY KEY,
      product_id integer NOT NULL REFERENCES products(id),
      number integer NOT NULL CHECK (number >= 1),
      ref_temp_c double precision NOT NULL,
      flash_min_minutes double precision NOT NULL CHECK (flash_min_minutes > 0),
      flash_max_minutes double precision NOT NULL CHECK (flash_max_minutes >= flash_min_minutes),
      flash_before_next_minutes double precision NOT NULL CHECK (flash_before_next_minutes > 0),
      recoat_window_minutes double precision CHECK (recoat_window_minutes >= flash_max_minutes),
      coats smallint NOT NULL CHECK (coats BETWEEN 1 AND 6),
      pot_life_minutes double precision CHECK (pot_life_minutes > 0),
      mix_ratio text,
      reducer_bands jsonb NOT NULL DEFAULT '[]'::jsonb,
      min_air_temp_c double precision,
      max_air_temp_c double precision,
      min_rh_pct double precision,
      max_rh_pct double precision,
      dust_free_minutes double precision,
      handle_minutes double precision,
      sand_polish_minutes double precision,
      bake_schedules jsonb NOT NULL DEFAULT '[]'::jsonb,
      min_cure_temp_c double precision,
      q10 double precision NOT NULL DEFAULT 2 CHECK (q10 >= 1),
      flash_table jsonb,
      wb_ref_rh_pct double precision,
      wb_ref_airflow_mps double precision,
      wb_airflow_exponent double precision,
      tds_sha256 text REFERENCES files(sha256),
      frozen_at timestamptz,
      created_by integer REFERENCES users(id),
      created_at timestamptz NOT NULL DEFAULT now(),
      updated_by integer REFERENCES users(id),
      updated_at timestamptz NOT NULL DEFAULT now(),
      UNIQUE (product_id, number)
    )`.execute(db)

  // Second line of defence behind the domain rules: a frozen revision keeps its values for good.
  // Only a missing data sheet may still be attached (once); a frozen revision is never deleted.
  await sql`
    CREATE FUNCTION spec_revisions_keep_frozen() RETURNS trigger LANGUAGE plpgsql AS $$
    DECLARE
      probe spec_revisions;
    BEGIN
      IF OLD.frozen_at IS NULL THEN
        IF TG_OP = 'DELETE' THEN RETURN OLD; END IF;
        RETURN NEW;
      END IF;
      IF TG_OP = 'DELETE' THEN
        RAISE EXCEPTION 'spec revision % is frozen', OLD.id;
      END IF;
      probe := NEW;
      probe.updated_at := OLD.updated_at;
      probe.updated_by := OLD.updated_by;
      IF OLD.tds_sha256 IS NULL THEN
        probe.tds_sha256 := NULL;
      END IF;
      IF probe IS DISTINCT FROM OLD THEN
        RAISE EXCEPTION 'spec revision % is frozen', OLD.id;
      END IF;
      RETURN NEW;
    END $$`.execute(db)
  await sql`
    CREATE TRIGGER spec_revisions_keep_frozen BEFORE UPDATE OR DELETE ON spec_revisions
    FOR EACH ROW EXECUTE FUNCTION spec_revisions_keep_frozen()`.execute(db)
}

export async function down(db: Kysely<unknown>): Promise<void> {
  await sql`DROP TABLE spec_revisions, products, files`.execute(db)
  await sql`DROP FUNCTION spec_revisions_keep_frozen`.execute(db)
}
