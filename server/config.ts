import { z } from 'zod'

// Every setting the server reads, in one place, validated once. Documented in .env.example.
const Settings = z.object({
  NODE_ENV: z.string().default('production'),
  DATABASE_URL: z.string().min(1, 'DATABASE_URL is required (the start scripts set it)'),
  DATABASE_POOL_MAX: z.coerce.number().int().min(1).max(100).default(10),
  MQTT_URL: z.string().optional(),
  MQTT_HOST: z.string().default('127.0.0.1'),
  MQTT_PORT: z.coerce.number().int().min(1).max(65535).default(1883),
  MQTT_USERNAME: z.string().optional(),
  MQTT_PASSWORD: z.string().optional(),
  MQTT_SHARED_GROUP: z.string().optional(),
  MQTT_CLIENT_ID: z.string().optional(),
  MQTT_DEVICE_MSG_RATE: z.coerce.number().min(1).default(100),
  MQTT_DEVICE_MSG_BURST: z.coerce.number().min(1).default(5_000),
  INGEST_MAX_AGE_HOURS: z.coerce.number().min(1).max(24 * 400).default(72),
  INGEST_SPOOL_DIR: z.string().default('var/spool'),
  INGEST_BUFFER_MAX: z.coerce.number().int().min(1000).default(200_000),
  RETENTION_DAYS: z.coerce.number().int().min(1).max(3650).default(400),
  SMTP_URL: z.string().default('smtp://127.0.0.1:2525'),
  MAIL_FROM: z.string().default('Boothbeat <alerts@boothbeat.invalid>'),
  PUBLIC_URL: z.string().default('http://127.0.0.1:3000'),
  UPLOAD_DIR: z.string().default('var/uploads'),
  DEMO_SEED: z.string().optional(),
  DEMO_PASSWORD: z.string().optional(),
  DEMO_DEVICE_PASSWORD: z.string().optional(),
  MAILBOX_PAGE: z.string().optional(),
  // Alerts and their e-mails (server/alerts, server/mail). The local SMTP sink stores messages in MAILBOX_DIR.
  MAILBOX_DIR: z.string().default('var/mailbox'),
  ALERT_ESCALATE_AFTER_SEC: z.coerce.number().min(1).default(900),
  ALERT_ESCALATE_MAX: z.coerce.number().int().min(0).max(100).default(3),
  ALERT_RATE_LIMIT_SEC: z.coerce.number().min(0).default(600),
  ALERT_DIGEST_AFTER: z.coerce.number().int().min(1).default(3),
  ALERT_DIGEST_WINDOW_SEC: z.coerce.number().min(1).default(60),
  ALERT_QUIET_HOURS: z
    .string()
    .regex(/^$|^([01]\d|2[0-3]):[0-5]\d-([01]\d|2[0-3]):[0-5]\d$/, 'ALERT_QUIET_HOURS is HH:MM-HH:MM (e.g. 22:00-06:00) or empty')
    .default(''),
  ALERT_TIME_ZONE: z.string().optional(),
  OUTBOX_RETRY_BASE_SEC: z.coerce.number().min(0.1).default(5),
  OUTBOX_RETRY_MAX_SEC: z.coerce.number().min(0.1).default(900),
  OUTBOX_MAX_ATTEMPTS: z.coerce.number().int().min(1).default(30),
})

export type ServerSettings = z.infer<typeof Settings>

let cached: ServerSettings | undefined

export function settings(): ServerSettings {
  if (!cached) {
    const parsed = Settings.safeParse(process.env)
    if (!parsed.success) {
      const lines = parsed.error.issues.map((i) => `${i.path.join('.')}: ${i.message}`)
      throw new Error(`Invalid settings:\n${lines.join('\n')}`)
    }
    cached = parsed.data
  }
  return cached
}

/** For tests that change the environment between cases. */
export function resetSettings(): void {
  cached = undefined
}
