/**
 * A private MariaDB server (Debian's mariadb-server binaries) on 127.0.0.1 with its data inside a folder we own.
 * Used by the start command and by the tests; never touches a system-wide instance.
 */
import { spawn, spawnSync, type ChildProcess } from 'node:child_process';
import { createHash } from 'node:crypto';
import { existsSync, mkdirSync, openSync, readFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';

export interface MariaDbOptions {
  dataDir: string;
  port: number;
  user: string;
  password: string;
  /** Databases to create if missing. */
  databases: string[];
}

export interface RunningMariaDb {
  port: number;
  /** True when this call started the server; false when one was already running on this data dir. */
  started: boolean;
  socket: string;
  stop(): Promise<void>;
  /** Runs SQL as root over the socket. */
  sql(statement: string): string;
}

export function binary(name: string): string {
  for (const dir of ['/usr/sbin', '/usr/bin', '/usr/local/sbin', '/usr/local/bin']) {
    const candidate = path.join(dir, name);
    if (existsSync(candidate)) return candidate;
  }
  throw new Error(`${name} not found — install Debian's mariadb-server package (apt-get install -y mariadb-server)`);
}

function sleep(ms: number) {
  return new Promise((r) => setTimeout(r, ms));
}

export async function startMariaDb(options: MariaDbOptions): Promise<RunningMariaDb> {
  const dataDir = path.resolve(options.dataDir);
  const runDir = path.join(dataDir, 'run');
  const files = path.join(dataDir, 'files');
  mkdirSync(runDir, { recursive: true });
  mkdirSync(path.join(dataDir, 'tmp'), { recursive: true });
  // Unix socket paths are limited to 107 characters, so the socket lives in the system temp folder.
  const socket = path.join(tmpdir(), `pw-mariadb-${createHash('sha1').update(dataDir).digest('hex').slice(0, 12)}.sock`);
  const pidFile = path.join(runDir, 'mariadbd.pid');
  const log = path.join(runDir, 'error.log');

  if (!existsSync(path.join(files, 'mysql'))) {
    mkdirSync(files, { recursive: true });
    const init = spawnSync(
      binary('mariadb-install-db'),
      [
        '--no-defaults',
        `--datadir=${files}`,
        '--user=root',
        '--auth-root-authentication-method=normal',
        '--skip-test-db',
        '--skip-name-resolve',
      ],
      { encoding: 'utf8' },
    );
    if (init.status !== 0) throw new Error(`mariadb-install-db failed:\n${init.stdout}\n${init.stderr}`);
  }

  const admin = binary('mariadb-admin');
  const ping = () =>
    spawnSync(admin, ['--no-defaults', `--socket=${socket}`, '-uroot', 'ping'], { encoding: 'utf8' }).status === 0;

  let child: ChildProcess | null = null;
  if (!ping()) {
    const out = openSync(log, 'a');
    child = spawn(
      binary('mariadbd'),
      [
        '--no-defaults',
        `--datadir=${files}`,
        `--socket=${socket}`,
        `--pid-file=${pidFile}`,
        `--port=${options.port}`,
        '--bind-address=127.0.0.1',
        '--user=root',
        `--tmpdir=${path.join(dataDir, 'tmp')}`,
        `--log-error=${log}`,
        '--skip-name-resolve',
        '--character-set-server=utf8mb4',
        '--collation-server=utf8mb4_unicode_ci',
        '--max-allowed-packet=64M',
        '--innodb-buffer-pool-size=256M',
        '--innodb-flush-log-at-trx-commit=2',
      ],
      { stdio: ['ignore', out, out], detached: true },
    );
    let exited = false;
    child.on('exit', () => (exited = true));
    const deadline = Date.now() + 30_000;
    while (!ping()) {
      if (exited || Date.now() > deadline) {
        const tail = existsSync(log) ? readFileSync(log, 'utf8').split('\n').slice(-15).join('\n') : '';
        throw new Error(`MariaDB did not start on port ${options.port}. Last log lines:\n${tail}`);
      }
      await sleep(200);
    }
  }

  const client = binary('mariadb');
  const sql = (statement: string) => {
    const r = spawnSync(client, ['--no-defaults', `--socket=${socket}`, '-uroot', '-N', '-B', '-e', statement], {
      encoding: 'utf8',
    });
    if (r.status !== 0) throw new Error(`MariaDB statement failed: ${r.stderr.trim()}`);
    return r.stdout;
  };
  const quoted = options.password.replace(/\\/g, '\\\\').replace(/'/g, "\\'");
  sql(
    [
      ...options.databases.map(
        (db) => `CREATE DATABASE IF NOT EXISTS \`${db}\` CHARACTER SET utf8mb4 COLLATE utf8mb4_unicode_ci`,
      ),
      `CREATE USER IF NOT EXISTS '${options.user}'@'127.0.0.1' IDENTIFIED BY '${quoted}'`,
      `GRANT ALL PRIVILEGES ON *.* TO '${options.user}'@'127.0.0.1'`,
      'FLUSH PRIVILEGES',
    ].join(';'),
  );

  return {
    port: options.port,
    started: child !== null,
    socket,
    sql,
    /** Shuts the server down — also one found running from an earlier start that ended abruptly (same data dir). */
    async stop() {
      spawnSync(admin, ['--no-defaults', `--socket=${socket}`, '-uroot', 'shutdown'], { encoding: 'utf8' });
      const deadline = Date.now() + 20_000;
      const running = () => (child ? child.exitCode === null && child.signalCode === null : ping());
      while (running() && Date.now() < deadline) await sleep(100);
      if (child && running()) child.kill('SIGKILL');
    },
  };
}
