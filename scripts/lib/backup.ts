/**
 * Backup and restore of Phasewright's database, run files included (they live in MariaDB as chunks), as one
 * gzip-compressed SQL dump from Debian's mariadb-dump: `--single-transaction` reads one consistent snapshot
 * while the app keeps working, `--hex-blob` writes the binary chunks as hex text. When nothing answers on a
 * loopback DB_PORT, the private MariaDB of DB_DATA_DIR is started for the job (as `npm start` does) and
 * stopped afterwards.
 */
import { spawn } from 'node:child_process';
import { createReadStream, createWriteStream, existsSync } from 'node:fs';
import { mkdtemp, open, rename, rm, stat, writeFile } from 'node:fs/promises';
import { connect } from 'node:net';
import { tmpdir } from 'node:os';
import path from 'node:path';
import type { Readable, Writable } from 'node:stream';
import { pipeline } from 'node:stream/promises';
import { createGunzip, createGzip } from 'node:zlib';
import mariadb, { type Connection } from 'mariadb';
import type { AppConfig } from '../../server/config';
import { binary, startMariaDb } from './mariadb';

export type BackupConfig = Pick<AppConfig, 'DB_HOST' | 'DB_PORT' | 'DB_NAME' | 'DB_USER' | 'DB_PASSWORD' | 'DB_DATA_DIR'>;

/** A problem the person running the command can act on; the command prints its message and exits 1. */
export class BackupError extends Error {}

/** The largest statement either side accepts: one 8 MiB run-file chunk is 16 MiB as hex. */
const MAX_PACKET = '64M';
const LOOPBACK = new Set(['127.0.0.1', 'localhost', '::1']);
/** Written by mariadb-dump as its last line; a dump without it was cut short. */
const COMPLETED = '-- Dump completed';
/** Every Phasewright database has this table (the applied migrations). */
const OUR_TABLE = 'CREATE TABLE `schema_migrations`';

const mib = (bytes: number) => `${(bytes / 1024 / 1024).toFixed(1)} MiB`;

function listening(host: string, port: number): Promise<boolean> {
  return new Promise((resolve) => {
    const socket = connect({ host, port, timeout: 2000 });
    const done = (open: boolean) => {
      socket.destroy();
      resolve(open);
    };
    socket.once('connect', () => done(true));
    socket.once('error', () => done(false));
    socket.once('timeout', () => done(false));
  });
}

interface Database {
  conn: Connection;
  where: string;
  /** Closes the connection, and stops the private MariaDB if this job started it. */
  close(): Promise<void>;
}

/** Connects to the configured MariaDB, starting the private one of DB_DATA_DIR when nothing answers on loopback. */
async function openDatabase(config: BackupConfig, job: 'backup' | 'restore'): Promise<Database> {
  const where = `${config.DB_HOST}:${config.DB_PORT}`;
  let stopServer: () => Promise<void> = async () => undefined;
  if (!(await listening(config.DB_HOST, config.DB_PORT))) {
    if (!LOOPBACK.has(config.DB_HOST)) throw new BackupError(`No MariaDB answers on ${where}; start it and run the ${job} again`);
    const dataDir = path.resolve(config.DB_DATA_DIR);
    if (job === 'backup' && !existsSync(path.join(dataDir, 'files', 'mysql'))) {
      throw new BackupError(`Nothing to back up: no MariaDB answers on ${where} and ${config.DB_DATA_DIR} holds no database`);
    }
    const server = await startMariaDb({ dataDir, port: config.DB_PORT, user: config.DB_USER, password: config.DB_PASSWORD, databases: [config.DB_NAME] });
    if (server.started) stopServer = () => server.stop();
  }
  let conn: Connection;
  try {
    conn = await mariadb.createConnection({ host: config.DB_HOST, port: config.DB_PORT, user: config.DB_USER, password: config.DB_PASSWORD, connectTimeout: 5000 });
  } catch (err) {
    await stopServer();
    throw new BackupError(`Cannot sign in to MariaDB on ${where} as ${config.DB_USER}: ${(err as Error).message}`);
  }
  return {
    conn,
    where,
    async close() {
      await conn.end().catch(() => undefined);
      await stopServer();
    },
  };
}

async function tableNames(db: Database, name: string): Promise<string[]> {
  const rows: { name: string }[] = await db.conn.query('SELECT table_name AS name FROM information_schema.tables WHERE table_schema = ?', [name]);
  return rows.map((r) => r.name);
}

/** "3 runs with 41 run files (12.4 MiB)", from the tables as they are now. */
async function runFigures(db: Database, name: string, tables: string[]): Promise<string> {
  if (!tables.includes('runs') || !tables.includes('run_artifacts')) return 'no runs';
  const [runs] = await db.conn.query(`SELECT COUNT(*) AS n FROM \`${name}\`.runs`);
  const [files] = await db.conn.query(`SELECT COUNT(*) AS n, COALESCE(SUM(size), 0) AS bytes FROM \`${name}\`.run_artifacts`);
  return `${Number(runs.n)} runs with ${Number(files.n)} run files (${mib(Number(files.bytes))})`;
}

/** The MariaDB command-line tools get the password from a private option file, never from their command line. */
async function withClientOptions<T>(config: BackupConfig, use: (optionFile: string) => Promise<T>): Promise<T> {
  const dir = await mkdtemp(path.join(tmpdir(), 'pw-backup-'));
  const quote = (value: string) => `"${value.replace(/\\/g, '\\\\').replace(/"/g, '\\"')}"`;
  const file = path.join(dir, 'client.cnf');
  const lines = ['[client]', `host=${config.DB_HOST}`, `port=${config.DB_PORT}`, 'protocol=TCP', `user=${quote(config.DB_USER)}`, `password=${quote(config.DB_PASSWORD)}`, ''];
  await writeFile(file, lines.join('\n'), { mode: 0o600 });
  try {
    return await use(file);
  } finally {
    await rm(dir, { recursive: true, force: true });
  }
}

/** The tool's own `ERROR …` line when there is one (the mariadb client also echoes the failed statement). */
function toolMessage(stderr: string): string {
  const lines = stderr.split('\n').map((line) => line.trim()).filter((line) => line && !/^-+$/.test(line));
  return lines.filter((line) => line.startsWith('ERROR')).pop() ?? (lines.slice(-3).join(' ') || 'no message');
}

/**
 * Runs a MariaDB tool, `feed` writing its stdin and `drain` reading its stdout; rejects with the tool's own
 * error output when it fails.
 */
async function runTool(
  tool: string,
  args: string[],
  io: { feed?: (stdin: Writable) => Promise<void>; drain?: (stdout: Readable) => Promise<void> },
): Promise<void> {
  const child = spawn(binary(tool), args, { stdio: [io.feed ? 'pipe' : 'ignore', io.drain ? 'pipe' : 'ignore', 'pipe'] });
  let stderr = '';
  child.stderr!.setEncoding('utf8').on('data', (text: string) => (stderr = (stderr + text).slice(-4000)));
  const exited = new Promise<number>((resolve, reject) => {
    child.once('error', reject);
    child.once('close', (code) => resolve(code ?? 1));
  });
  const streams = [io.feed?.(child.stdin!), io.drain?.(child.stdout!)].filter((p): p is Promise<void> => p !== undefined);
  const piped = Promise.all(streams).then(
    () => null,
    (err: Error) => err,
  );
  const [code, streamError] = await Promise.all([exited, piped]);
  if (code !== 0) throw new BackupError(`${tool} stopped (exit code ${code}): ${toolMessage(stderr)}`);
  if (streamError) throw streamError;
}

/** `npm run backup -- FILE`: a consistent, compressed dump of the database; never overwrites a file. */
export async function backupDatabase(config: BackupConfig, file: string, say: (line: string) => void): Promise<void> {
  const target = path.resolve(file);
  if (existsSync(target)) throw new BackupError(`${file} already exists; a backup never overwrites a file — choose a new name`);
  if (!existsSync(path.dirname(target))) throw new BackupError(`The folder ${path.dirname(target)} does not exist`);
  const partial = `${target}.partial`;
  const db = await openDatabase(config, 'backup');
  try {
    const tables = await tableNames(db, config.DB_NAME);
    if (tables.length === 0) throw new BackupError(`The database "${config.DB_NAME}" on ${db.where} is empty or missing; nothing to back up`);
    const figures = await runFigures(db, config.DB_NAME, tables);
    const began = Date.now();
    const args = ['--single-transaction', '--quick', '--hex-blob', `--max-allowed-packet=${MAX_PACKET}`, '--default-character-set=utf8mb4', '--triggers', config.DB_NAME];
    await withClientOptions(config, (options) =>
      runTool('mariadb-dump', [`--defaults-file=${options}`, ...args], {
        drain: (stdout) => pipeline(stdout, createGzip(), createWriteStream(partial, { mode: 0o600 })),
      }),
    );
    await rename(partial, target);
    const seconds = ((Date.now() - began) / 1000).toFixed(1);
    say(`Backed up "${config.DB_NAME}" from ${db.where}: ${tables.length} tables, ${figures}.`);
    say(`Wrote ${file}: ${mib((await stat(target)).size)} compressed, in ${seconds} s.`);
  } finally {
    await rm(partial, { force: true });
    await db.close();
  }
}

/**
 * Reads the whole backup once before anything is restored: gzip intact (its checksum is checked at the end),
 * a MariaDB dump of a Phasewright database, and complete (ends with mariadb-dump's completion line).
 */
async function checkBackupFile(file: string): Promise<void> {
  const info = await stat(file).catch(() => null);
  if (!info?.isFile()) throw new BackupError(`${file} does not exist or is not a file`);
  const handle = await open(file, 'r');
  const magic = Buffer.alloc(2);
  await handle.read(magic, 0, 2, 0);
  await handle.close();
  if (magic[0] !== 0x1f || magic[1] !== 0x8b) throw new BackupError(`${file} is not a Phasewright backup: it is not gzip-compressed`);
  let head = '';
  let tail = '';
  let ours = false;
  try {
    for await (const chunk of createReadStream(file).pipe(createGunzip())) {
      const text = (chunk as Buffer).toString('latin1');
      if (head.length < 512) head += text.slice(0, 512 - head.length);
      const window = tail + text;
      ours ||= window.includes(OUR_TABLE);
      tail = window.slice(-256);
    }
  } catch (err) {
    throw new BackupError(`${file} is damaged (${(err as Error).message}); nothing was restored`);
  }
  // Recent mariadb-dump versions put a `/*M!999999\- enable the sandbox mode */` line first.
  if (!/^-- (MariaDB|MySQL) dump/m.test(head)) throw new BackupError(`${file} is not a Phasewright backup: it holds no MariaDB dump`);
  if (!ours) throw new BackupError(`${file} is a MariaDB dump, but not of a Phasewright database (no schema_migrations table)`);
  if (!tail.includes(COMPLETED)) throw new BackupError(`${file} is incomplete: the dump was cut short before its last line; nothing was restored`);
}

/**
 * `npm run restore -- FILE`: loads a backup into an empty database (a fresh data folder); refuses a database
 * that holds any table. If loading fails half-way, the tables it created are dropped again.
 */
export async function restoreDatabase(config: BackupConfig, file: string, say: (line: string) => void): Promise<void> {
  await checkBackupFile(file);
  const db = await openDatabase(config, 'restore');
  try {
    await db.conn.query(`CREATE DATABASE IF NOT EXISTS \`${config.DB_NAME}\` CHARACTER SET utf8mb4 COLLATE utf8mb4_unicode_ci`);
    const existing = await tableNames(db, config.DB_NAME);
    if (existing.length > 0) {
      throw new BackupError(
        `Restore refused: the database "${config.DB_NAME}" on ${db.where} already holds ${existing.length} tables, and a restore only fills an empty one. ` +
          `Stop Phasewright, move the data folder ${config.DB_DATA_DIR} aside (or set DB_DATA_DIR or DB_NAME to a new one) and run the restore again.`,
      );
    }
    const began = Date.now();
    const args = [`--max-allowed-packet=${MAX_PACKET}`, '--default-character-set=utf8mb4', '--binary-mode', config.DB_NAME];
    try {
      await withClientOptions(config, (options) =>
        runTool('mariadb', [`--defaults-file=${options}`, ...args], {
          feed: (stdin) => pipeline(createReadStream(file), createGunzip(), stdin),
        }),
      );
    } catch (err) {
      const created = await tableNames(db, config.DB_NAME);
      await db.conn.query('SET FOREIGN_KEY_CHECKS = 0');
      for (const table of created) await db.conn.query(`DROP TABLE IF EXISTS \`${config.DB_NAME}\`.\`${table}\``);
      throw new BackupError(`The restore failed and was undone (the database is empty again): ${(err as Error).message}`);
    }
    const tables = await tableNames(db, config.DB_NAME);
    const seconds = ((Date.now() - began) / 1000).toFixed(1);
    say(`Restored ${file} into "${config.DB_NAME}" on ${db.where} in ${seconds} s: ${tables.length} tables, ${await runFigures(db, config.DB_NAME, tables)}.`);
  } finally {
    await db.close();
  }
}
