import { z } from 'zod';

const flag = z
  .enum(['true', 'false', '1', '0', 'yes', 'no'])
  .transform((v) => v === 'true' || v === '1' || v === 'yes');

const envSchema = z.object({
  NODE_ENV: z.enum(['development', 'production', 'test']).default('development'),
  HOST: z.string().default('127.0.0.1'),
  PORT: z.coerce.number().int().min(1).max(65535).default(5180),
  PUBLIC_URL: z.string().url().optional(),
  DB_HOST: z.string().default('127.0.0.1'),
  DB_PORT: z.coerce.number().int().min(1).max(65535).default(3407),
  DB_NAME: z.string().regex(/^[A-Za-z0-9_]+$/, 'letters, digits and _ only').default('phasewright'),
  DB_USER: z.string().default('phasewright'),
  DB_PASSWORD: z.string().default('phasewright-local'),
  SESSION_SECRET: z.string().min(16, 'use at least 16 characters').default('phasewright-local-session-secret'),
  SMTP_HOST: z.string().default('127.0.0.1'),
  SMTP_PORT: z.coerce.number().int().min(1).max(65535).default(1025),
  MAIL_FROM: z.string().default('Phasewright <no-reply@phasewright.local>'),
  ALLOW_SIGNUP: flag.default(false),
  /** Least time between two writes of a session's sliding expiry, s (0: on every request). */
  SESSION_TOUCH_SECONDS: z.coerce.number().int().min(0).max(3600).default(60),
  /**
   * How long the signed-in account and project roles read for one request are reused by the next ones, s
   * (0: read on every request). Every change made through the server drops them at once; this only bounds
   * how long a change made by hand in the database goes unseen.
   */
  ACCESS_CACHE_SECONDS: z.coerce.number().min(0).max(300).default(5),
  /** Accounts and project roles kept in that cache at most. */
  ACCESS_CACHE_ENTRIES: z.coerce.number().int().min(0).max(1_000_000).default(10_000),
  SIGNIN_LIMIT: z.coerce.number().int().min(1).default(10),
  SIGNIN_WINDOW_MINUTES: z.coerce.number().min(0.01).default(15),
  BCRYPT_COST: z.coerce.number().int().min(4).max(15).default(12),
  LOG_LEVEL: z.enum(['fatal', 'error', 'warn', 'info', 'debug', 'trace', 'silent']).default('info'),
  CLIENT_DIST: z.string().default('dist'),
  /** Worker threads of the run queue; omitted: one per core (os.availableParallelism()). */
  RUN_WORKERS: z.coerce.number().int().min(1, 'use at least 1').max(256).optional(),
  /**
   * Nice value of the run queue's threads (0–19; 0: as the server). Above 0 a computing run yields the cores
   * to requests and the database and takes what they leave idle.
   */
  RUN_WORKER_NICE: z.coerce.number().int().min(0).max(19).default(10),
  /** Helper threads inside each run (both channels retrieved at once); omitted: on when 2·RUN_WORKERS ≤ cores. */
  RUN_HELPER_THREADS: flag.optional(),
});

export type AppConfig = z.infer<typeof envSchema> & { publicUrl: string };

/** Reads and validates the environment; fails fast with one line per bad variable. */
export function loadConfig(env: NodeJS.ProcessEnv = process.env): AppConfig {
  const parsed = envSchema.safeParse(env);
  if (!parsed.success) {
    const lines = parsed.error.issues.map((i) => `  ${i.path.join('.')}: ${i.message}`);
    throw new Error(`Invalid configuration:\n${lines.join('\n')}`);
  }
  const c = parsed.data;
  return { ...c, publicUrl: (c.PUBLIC_URL ?? `http://${c.HOST}:${c.PORT}`).replace(/\/$/, '') };
}
