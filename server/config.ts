import { z } from 'zod';
import { ATOM_LIBRARY_LIMITS } from '../shared/schemas/atom-libraries';
import { UPLOAD_LIMITS } from '../shared/schemas/uploads';

const MIB = 1024 * 1024;

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
  SIGNIN_LIMIT: z.coerce.number().int().min(1).default(10),
  SIGNIN_WINDOW_MINUTES: z.coerce.number().min(0.01).default(15),
  BCRYPT_COST: z.coerce.number().int().min(4).max(15).default(12),
  LOG_LEVEL: z.enum(['fatal', 'error', 'warn', 'info', 'debug', 'trace', 'silent']).default('info'),
  CLIENT_DIST: z.string().default('dist'),
  /** Worker threads of the run queue; omitted: one per core (os.availableParallelism()). */
  RUN_WORKERS: z.coerce.number().int().min(1, 'use at least 1').max(256).optional(),
  /** Helper threads inside each run (both channels retrieved at once); omitted: on when 2·RUN_WORKERS ≤ cores. */
  RUN_HELPER_THREADS: flag.optional(),
  // Limits on what one request may make the server parse or decode (README "Security and limits").
  JSON_MAX_KIB: z.coerce.number().int().min(1).default(256),
  JSON_MAX_DEPTH: z.coerce.number().int().min(2).default(64),
  FORM_FIELD_MAX_BYTES: z.coerce.number().int().min(64).default(1024),
  UPLOAD_MAX_MIB: z.coerce.number().min(0.001).default(UPLOAD_LIMITS.maxBytes / MIB),
  UPLOAD_MAX_SIDE: z.coerce.number().int().min(1).default(UPLOAD_LIMITS.maxSide),
  UPLOAD_MAX_DECODED_MIB: z.coerce.number().min(1).default(64),
  UPLOAD_DECODE_TIMEOUT_MS: z.coerce.number().int().min(100).default(10_000),
  UPLOAD_DECODE_HEAP_MIB: z.coerce.number().int().min(16).default(256),
  UPLOAD_DECODE_THREADS: z.coerce.number().int().min(1).max(64).default(1),
  UPLOAD_DECODE_QUEUE: z.coerce.number().int().min(0).default(8),
  JPEG_MAX_SCANS: z.coerce.number().int().min(1).default(100),
  NPY_MAX_HEADER_BYTES: z.coerce.number().int().min(128).default(65_536),
  ATOM_CSV_MAX_MIB: z.coerce.number().min(0.001).default(ATOM_LIBRARY_LIMITS.maxBytes / MIB),
  ATOM_CSV_MAX_ROWS: z.coerce.number().int().min(1).default(ATOM_LIBRARY_LIMITS.maxAtoms),
  ATOM_CSV_MAX_COLUMNS: z.coerce.number().int().min(10).default(64),
  ATOM_CSV_MAX_LINE_CHARS: z.coerce.number().int().min(80).default(4_000),
  ATOM_CSV_MAX_PROBLEMS: z.coerce.number().int().min(1).default(200),
  HEALTH_DB_TIMEOUT_MS: z.coerce.number().int().min(1).max(150, 'keep it under 150 ms: the health check answers within 200 ms').default(50),
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
