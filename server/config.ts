import { resolve } from 'node:path'
import { z } from 'zod'

const bool = z.enum(['0', '1', 'true', 'false']).transform((v) => v === '1' || v === 'true')
const int = (def: number, min = 0) => z.coerce.number().int().min(min).default(def)

/** Every setting, from environment variables; defaults are those `npm start` uses. */
const schema = z.object({
  NODE_ENV: z.enum(['production', 'development', 'test']).default('development'),
  HOST: z.string().default('127.0.0.1'),
  PORT: int(8080, 1),
  PUBLIC_URL: z.string().url().optional(),
  DB_HOST: z.string().default('127.0.0.1'),
  DB_PORT: int(3407, 1),
  DB_NAME: z
    .string()
    .regex(/^[A-Za-z0-9_]+$/, 'letters, digits and _ only')
    .default('lineweight'),
  DB_USER: z.string().default('lineweight'),
  DB_PASSWORD: z.string().default('lineweight-local'),
  DB_POOL_MAX: int(10, 1),
  SESSION_SECRET: z.string().min(32, 'must be at least 32 characters'),
  SESSION_IDLE_MINUTES: int(30, 1),
  SESSION_ABSOLUTE_HOURS: int(12, 1),
  COOKIE_SECURE: bool.default(false),
  BCRYPT_ROUNDS: int(12, 4),
  LOGIN_MAX_ATTEMPTS: int(10, 1),
  LOGIN_WINDOW_MINUTES: int(15, 1),
  API_RATE_PER_MINUTE: int(600, 1),
  /** Requests a minute one personal API token may make (counted per token, not per address). */
  API_TOKEN_RATE_PER_MINUTE: int(1200, 1),
  RESET_MAX_REQUESTS: int(5, 1),
  /** Express "trust proxy": unset trusts no proxy; e.g. `loopback`, `1`, `10.0.0.0/8`. */
  TRUST_PROXY: z.string().trim().optional(),
  CLAIMS_MAX_OPEN: int(3, 1),
  INVITE_HOURS: int(72, 1),
  RESET_MINUTES: int(60, 1),
  MAIL_MODE: z.enum(['fake', 'smtp']).default('fake'),
  MAIL_FROM: z.string().default('Lineweight <no-reply@lineweight.example>'),
  SMTP_HOST: z.string().default('127.0.0.1'),
  /** Unset: a relay's 2525, or any free port for the in-process mail catcher. */
  SMTP_PORT: z.coerce.number().int().min(0).max(65535).optional(),
  SMTP_USER: z.string().optional(),
  SMTP_PASSWORD: z.string().optional(),
  SMTP_SECURE: bool.default(false),
  UPLOAD_MAX_BYTES: int(50 * 1024 * 1024, 1024),
  UPLOAD_MAX_REQUEST_BYTES: int(200 * 1024 * 1024, 1024),
  UPLOAD_MAX_FILES: int(500, 1),
  UPLOAD_MAX_PIXELS: int(2_000_000, 100),
  UPLOAD_MIN_PIXELS: int(100, 2),
  UPLOADS_PER_USER: int(2, 1),
  UPLOADS_TOTAL: int(8, 1),
  UPLOAD_BYTES_PER_MINUTE: int(1024 * 1024 * 1024, 1024),
  UPLOAD_FILES_PER_MINUTE: int(20_000, 1),
  STORAGE_DRIVER: z.enum(['local', 's3']).default('local'),
  STORAGE_DIR: z.string().default(resolve('.data', 'files')),
  /** S3-compatible object storage (STORAGE_DRIVER=s3); the endpoint is unset for AWS itself. */
  S3_ENDPOINT: z.string().url().optional(),
  S3_REGION: z.string().default('us-east-1'),
  S3_BUCKET: z.string().min(3).default('lineweight'),
  S3_PREFIX: z
    .string()
    .regex(/^([a-z0-9][a-z0-9_.-]*\/)*$/, 'lower-case path ending in /, or empty')
    .default(''),
  S3_ACCESS_KEY_ID: z.string().optional(),
  S3_SECRET_ACCESS_KEY: z.string().optional(),
  /** Path-style URLs (endpoint/bucket/key), which local S3 servers need. */
  S3_FORCE_PATH_STYLE: bool.default(true),
  /** Processing queue: `database` (the processing_jobs table, worker threads in the server) or `redis` (BullMQ; `npm run worker` processes). */
  QUEUE: z.enum(['database', 'redis']).default('database'),
  REDIS_URL: z.string().url().default('redis://127.0.0.1:6379'),
  WORKERS: int(0, 0),
  JOB_POLL_SECONDS: z.coerce.number().positive().default(5),
  JOB_LEASE_SECONDS: z.coerce.number().positive().default(120),
  DB_RETRY_AFTER_SECONDS: int(5, 1),
  LOG_LEVEL: z.enum(['fatal', 'error', 'warn', 'info', 'debug', 'trace', 'silent']).default('info'),
})

export type Config = z.infer<typeof schema> & { publicUrl: string }

/** Reads and validates the settings once; a bad value stops start-up with a message naming it. */
export function loadConfig(env: NodeJS.ProcessEnv = process.env): Config {
  const parsed = schema.safeParse(env)
  if (!parsed.success) {
    const lines = parsed.error.issues.map((i) => `  ${i.path.join('.')}: ${i.message}`)
    throw new Error(`Invalid configuration:\n${lines.join('\n')}`)
  }
  const c = parsed.data
  return { ...c, publicUrl: c.PUBLIC_URL ?? `http://${c.HOST}:${c.PORT}` }
}
