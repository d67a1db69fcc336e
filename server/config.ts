import { z } from 'zod';
import { ATOM_LIBRARY_LIMITS } from '../shared/schemas/atom-libraries';
import { NK_TABLE_LIMITS } from '../shared/optics/nk-table';
import { UPLOAD_LIMITS } from '../shared/schemas/uploads';

const MIB = 1024 * 1024;

/** Default PREVIEW_TILES_MAX_SIDE: the full resolution of every design size up to 4096². */
export const DEFAULT_TILES_MAX_SIDE = 4096;

const flag = z
  .enum(['true', 'false', '1', '0', 'yes', 'no'])
  .transform((v) => v === 'true' || v === '1' || v === 'yes');

/** The session secret used when none is set: fine on loopback, refused anywhere else. */
const DEFAULT_SESSION_SECRET = 'phasewright-local-session-secret';

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
  /**
   * Path of MariaDB's unix socket on this machine: when set, the app connects through it instead of DB_HOST and
   * DB_PORT (same account and password). A query costs less than over loopback TCP. `npm start` sets it to its
   * private server's socket; empty means TCP.
   */
  DB_SOCKET: z.string().default(''),
  /** Data folder of the private MariaDB that `npm start`, `npm run backup` and `npm run restore` run on loopback. */
  DB_DATA_DIR: z.string().min(1).default('.data/mariadb'),
  SESSION_SECRET: z.string().min(16, 'use at least 16 characters').default(DEFAULT_SESSION_SECRET),
  /** Absolute lifetime of a signed-in session, days, however active it is. */
  SESSION_MAX_DAYS: z.coerce.number().positive('use a positive number of days').max(365).default(7),
  /** A session unused this long ends, hours; the absolute lifetime ends it earlier when shorter. */
  SESSION_IDLE_HOURS: z.coerce.number().positive('use a positive number of hours').max(365 * 24).default(72),
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
  /**
   * Memory for the answers of the busiest lists (projects, runs, notifications) kept for ACCESS_CACHE_SECONDS
   * (server/db/list-caches.ts), MiB; 0 reads them afresh every time.
   */
  LIST_CACHE_MIB: z.coerce.number().min(0).max(4096).default(16),
  SIGNIN_LIMIT: z.coerce.number().int().min(1).default(10),
  SIGNIN_WINDOW_MINUTES: z.coerce.number().min(0.01).default(15),
  /** Failed sign-ins allowed from one client address, whatever the e-mails, per SIGNIN_WINDOW_MINUTES. */
  SIGNIN_ADDRESS_LIMIT: z.coerce.number().int().min(1).default(50),
  /** Seed the demo accounts (published password) on a non-loopback HOST too; on loopback they are always seeded. */
  SEED_DEMO: flag.optional(),
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
  /** Where runs execute: `embedded` (worker threads in the server) or `redis` (BullMQ; `npm run worker` processes). */
  RUN_QUEUE: z.enum(['embedded', 'redis']).default('embedded'),
  /** The Redis of RUN_QUEUE=redis, e.g. redis://:password@10.0.0.5:6380/0 (rediss:// for TLS). */
  REDIS_URL: z.string().url('use a URL such as redis://127.0.0.1:6380').default('redis://127.0.0.1:6380'),
  /** Prefix of the queue's keys in Redis: installations sharing one Redis use different ones. */
  REDIS_PREFIX: z.string().regex(/^[A-Za-z0-9_-]+$/, 'letters, digits, _ and - only').default('phasewright'),
  /** Data folder of the private Redis that `RUN_QUEUE=redis npm start` runs on loopback. */
  REDIS_DATA_DIR: z.string().min(1).default('.data/redis'),
  /** Worker processes `RUN_QUEUE=redis npm start` starts on this machine (0: only the ones you start elsewhere). */
  RUN_WORKER_PROCESSES: z.coerce.number().int().min(0).max(64).default(2),
  /** How often a worker process looks for runs whose worker stopped answering (BullMQ stalled jobs), s. */
  RUN_STALLED_CHECK_SECONDS: z.coerce.number().min(0.1).max(3600).default(30),
  /** How long a worker's hold on a run lasts without renewal, s; a run not renewed in time is taken by another worker. */
  RUN_LOCK_SECONDS: z.coerce.number().min(0.2).max(3600).default(30),
  /** How often the server compares the queued and running runs with the jobs in Redis and gives any without one a job, s. */
  RUN_QUEUE_RECHECK_SECONDS: z.coerce.number().min(0).max(3600).default(30),
  /** Queued + running runs (tolerance studies and library builds included) one person may have at once, over all projects. */
  RUNS_PER_USER: z.coerce.number().int().min(1).default(4),
  /** Queued + running runs (tolerance studies and library builds included) of one project at once. */
  RUNS_PER_PROJECT: z.coerce.number().int().min(1).default(8),
  /** A run or tolerance study still running this long after it started is stopped and failed. */
  RUN_TIME_LIMIT_MINUTES: z.coerce.number().positive().default(60),
  /**
   * Memory one run may take on a run worker, MiB: a run whose estimated peak (shared/optics/run-memory.ts) is
   * larger is refused before it starts; also the JavaScript heap limit of the run threads. Default for a 24 GB
   * machine running two runs at once beside the server and MariaDB.
   */
  RUN_MEMORY_BUDGET_MB: z.coerce.number().int().min(256, 'use at least 256').max(1_048_576).default(8192),
  /** A library build still running this long after it started is stopped and failed. */
  LIBRARY_BUILD_TIME_LIMIT_MINUTES: z.coerce.number().positive().default(30),
  /**
   * Largest side in pixels of level 0 of a run's tile pyramids (README "Tile pyramids"); larger designs are
   * halved to it. 0: runs write no tile pyramids (the run page shows the single preview PNG).
   */
  PREVIEW_TILES_MAX_SIDE: z.coerce
    .number()
    .int()
    .max(65_536)
    .refine((v) => v === 0 || v >= 256, 'use 0 (no tile pyramids) or at least 256, the side of one tile')
    .default(DEFAULT_TILES_MAX_SIDE),
  /** Bytes one project may store (uploads + run files), in MiB. */
  PROJECT_STORAGE_MB: z.coerce.number().positive().default(10240),
  /** Run event streams (Server-Sent Events) one person may hold open at once. */
  EVENT_STREAMS_PER_USER: z.coerce.number().int().min(1).default(8),
  /** How often an open event stream checks again that its reader may still see the project. */
  EVENT_STREAM_RECHECK_SECONDS: z.coerce.number().positive().default(15),
  /** Layout regions, design checks, reports and fab packages one person may ask for per minute. */
  FAB_REQUESTS_PER_MINUTE: z.coerce.number().int().min(1).default(120),
  /** Longest a layout job (region, design-rule check, GDSII regeneration) may take on its worker thread. */
  FAB_JOB_TIME_LIMIT_SECONDS: z.coerce.number().positive().default(60),
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
  /** Rows of a tabulated n, k material in a library spec (parseLibrarySpec's nkLimits) and of an n, k CSV. */
  NK_TABLE_MAX_ROWS: z.coerce.number().int().min(2).default(NK_TABLE_LIMITS.maxRows),
  NK_TABLE_MAX_LINE_CHARS: z.coerce.number().int().min(40).default(NK_TABLE_LIMITS.maxLineChars),
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
  if (!isLoopback(c.HOST) && c.SESSION_SECRET === DEFAULT_SESSION_SECRET) {
    throw new Error(`Invalid configuration: SESSION_SECRET is the published default; set your own (at least 16 random characters) to listen on HOST=${c.HOST}, which is not loopback`);
  }
  return { ...c, publicUrl: (c.PUBLIC_URL ?? `http://${c.HOST}:${c.PORT}`).replace(/\/$/, '') };
}

/** 127.0.0.0/8, ::1 and localhost: reachable from this machine only. */
export function isLoopback(host: string): boolean {
  const h = host.trim().toLowerCase().replace(/^\[|\]$/g, '');
  return h === 'localhost' || h === '::1' || /^127(\.\d{1,3}){3}$/.test(h) || /^::ffff:127(\.\d{1,3}){3}$/.test(h);
}

/** The demo accounts share a published password: seeded on loopback, elsewhere only when SEED_DEMO=true. */
export function seedsDemo(config: AppConfig): boolean {
  return config.SEED_DEMO ?? isLoopback(config.HOST);
}
