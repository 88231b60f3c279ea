import { sql, type Kysely } from 'kysely'

// Watches (alert rules) per booth, the evaluators' saved state, drift alerts with their life cycle, and the
// outbox every notification e-mail goes through.
export async function up(db: Kysely<unknown>): Promise<void> {
  // One row per booth that has its own rule set; a booth without a row uses the shop defaults
  // (shared/watch defaultWatchRules). rules: JSON array of { rule, recipients } as validated by WatchRuleSchema.
  await sql`
    CREATE TABLE watch_sets (
      booth_id integer PRIMARY KEY REFERENCES booths(id) ON DELETE CASCADE,
      rules jsonb NOT NULL CHECK (jsonb_typeof(rules) = 'array'),
      version integer NOT NULL DEFAULT 1,
      updated_by integer REFERENCES users(id),
      updated_at timestamptz NOT NULL DEFAULT now()
    )`.execute(db)

  // The in-memory evaluator of each booth, saved so a restart resumes pending durations, CUSUM sums and
  // open alerts; plus the application window a job step set.
  await sql`
    CREATE TABLE watch_states (
      booth_id integer PRIMARY KEY REFERENCES booths(id) ON DELETE CASCADE,
      snapshot jsonb NOT NULL,
      application_window jsonb,
      saved_at timestamptz NOT NULL DEFAULT now()
    )`.execute(db)

  await sql`
    CREATE TABLE alerts (
      id bigserial PRIMARY KEY,
      booth_id integer NOT NULL REFERENCES booths(id),
      rule_id text NOT NULL,
      kind text NOT NULL,
      label text,
      severity text NOT NULL CHECK (severity IN ('critical', 'warning')),
      channel text,
      unit text,
      state text NOT NULL DEFAULT 'open' CHECK (state IN ('open', 'acknowledged', 'resolved')),
      message text NOT NULL,
      clear_message text,
      value double precision,
      limit_value double precision,
      peak double precision,
      last_value double precision,
      opened_at timestamptz NOT NULL,
      cleared_at timestamptz,
      acknowledged_at timestamptz,
      acknowledged_by integer REFERENCES users(id),
      ack_note text,
      resolved_at timestamptz,
      resolved_by integer REFERENCES users(id),
      resolution text CHECK (resolution IN ('cleared', 'manual', 'watch_removed')),
      resolve_note text,
      recipients jsonb NOT NULL DEFAULT '[]'::jsonb,
      notify_state text NOT NULL DEFAULT 'pending'
        CHECK (notify_state IN ('pending', 'deferred', 'digest', 'sent', 'skipped')),
      notify_due_at timestamptz NOT NULL DEFAULT now(),
      notified_at timestamptz,
      escalations integer NOT NULL DEFAULT 0,
      next_escalation_at timestamptz,
      created_at timestamptz NOT NULL DEFAULT now(),
      updated_at timestamptz NOT NULL DEFAULT now(),
      CHECK ((state = 'resolved') = (resolved_at IS NOT NULL)),
      CHECK (state <> 'acknowledged' OR acknowledged_at IS NOT NULL)
    )`.execute(db)
  // At most one alert that is not resolved per watch and booth.
  await sql`CREATE UNIQUE INDEX alerts_one_active_idx ON alerts (booth_id, rule_id) WHERE state <> 'resolved'`.execute(db)
  await sql`CREATE INDEX alerts_booth_opened_idx ON alerts (booth_id, opened_at DESC)`.execute(db)
  await sql`CREATE INDEX alerts_opened_idx ON alerts (opened_at DESC, id DESC)`.execute(db)
  await sql`CREATE INDEX alerts_notify_due_idx ON alerts (notify_due_at) WHERE notify_state IN ('pending', 'deferred', 'digest')`.execute(db)
  await sql`CREATE INDEX alerts_escalation_idx ON alerts (next_escalation_at) WHERE state = 'open' AND next_escalation_at IS NOT NULL`.execute(db)

  // Every e-mail is written here first, rendered, and sent by a worker that retries with backoff.
  await sql`
    CREATE TABLE outbox (
      id bigserial PRIMARY KEY,
      kind text NOT NULL CHECK (kind IN ('alert', 'escalation', 'digest')),
      alert_id bigint REFERENCES alerts(id),
      alert_ids jsonb NOT NULL DEFAULT '[]'::jsonb,
      recipients jsonb NOT NULL CHECK (jsonb_typeof(recipients) = 'array'),
      subject text NOT NULL,
      text_body text NOT NULL,
      html_body text NOT NULL,
      state text NOT NULL DEFAULT 'queued' CHECK (state IN ('queued', 'sent', 'failed')),
      attempts integer NOT NULL DEFAULT 0,
      next_attempt_at timestamptz NOT NULL DEFAULT now(),
      last_error text,
      message_id text,
      created_at timestamptz NOT NULL DEFAULT now(),
      sent_at timestamptz
    )`.execute(db)
  await sql`CREATE INDEX outbox_due_idx ON outbox (next_attempt_at, id) WHERE state = 'queued'`.execute(db)
  await sql`CREATE INDEX outbox_alert_idx ON outbox (alert_id)`.execute(db)
  await sql`CREATE INDEX outbox_created_idx ON outbox (created_at)`.execute(db)
}

export async function down(db: Kysely<unknown>): Promise<void> {
  await sql`DROP TABLE outbox, alerts, watch_states, watch_sets`.execute(db)
}
