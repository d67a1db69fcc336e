/**
 * A private MariaDB server (Debian's mariadb-server binaries) on 127.0.0.1 with its data inside a folder we own.
 * Used by the start command and by the tests; never touches a system-wide instance.
 *
 * Accounts: root (and, when started by another user, an account named after that user) signs in only
 * through the unix socket as that operating-system user (unix_socket), never with a password and never over
 * TCP, so other local users cannot reach it; the app's user may use its own database(s) only.
 */
import { spawn, spawnSync, type ChildProcess } from 'node:child_process';
import { createHash } from 'node:crypto';
import { chmodSync, closeSync, existsSync, mkdirSync, openSync, readFileSync } from 'node:fs';
import { tmpdir, userInfo } from 'node:os';
import path from 'node:path';

export interface MariaDbOptions {
  dataDir: string;
  port: number;
  user: string;
  password: string;
  /** Databases to create if missing. */
  databases: string[];
  /**
   * Database names (LIKE patterns allowed, e.g. `pw\\_test\\_%`) the app's user may use — and create, for a
   * pattern; default: `databases`. Never *.*.
   */
  grants?: string[];
}

/** The system account mariadbd runs as when started by root (created on first use). */
const MARIADB_SYSTEM_USER = 'phasewright-db';

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

function systemAccount(name: string): { uid: number; gid: number } | null {
  const uid = spawnSync('id', ['-u', name], { encoding: 'utf8' });
  const gid = spawnSync('id', ['-g', name], { encoding: 'utf8' });
  return uid.status === 0 && gid.status === 0 ? { uid: Number(uid.stdout), gid: Number(gid.stdout) } : null;
}

/**
 * Whom mariadbd runs as. Started by an ordinary user: that user. Started by root: the dedicated system
 * account MARIADB_SYSTEM_USER (created here, no login, no home), owning the data folder — unless that account
 * cannot reach the data folder (a parent folder closed to others, e.g. under /root): then mariadbd must run
 * as root, because no other account could open its own files; we say so on the console.
 */
function serverAccount(dataDir: string): { name: string; uid: number; gid: number } | null {
  if (process.getuid?.() !== 0) return null;
  let account = systemAccount(MARIADB_SYSTEM_USER);
  if (!account) {
    const made = spawnSync('useradd', ['--system', '--user-group', '--no-create-home', '--home-dir', '/nonexistent', '--shell', '/usr/sbin/nologin', MARIADB_SYSTEM_USER], { encoding: 'utf8' });
    account = systemAccount(MARIADB_SYSTEM_USER); // another start may have created it meanwhile
    if (!account) throw new Error(`Could not create the system user ${MARIADB_SYSTEM_USER} for MariaDB: ${made.stderr.trim()}`);
  }
  const reachable = spawnSync('runuser', ['-u', MARIADB_SYSTEM_USER, '--', 'test', '-x', path.dirname(dataDir)]).status === 0;
  if (!reachable) {
    console.warn(`› MariaDB runs as root: ${MARIADB_SYSTEM_USER} cannot reach ${path.dirname(dataDir)} (a parent folder is closed to other users)`);
    return null;
  }
  return { name: MARIADB_SYSTEM_USER, ...account };
}

/** Gives the data folder to mariadbd's account (also what an earlier start made as root), closed to others. */
function handOver(dataDir: string, account: { uid: number; gid: number } | null) {
  if (account) {
    const chown = spawnSync('chown', ['-R', `${account.uid}:${account.gid}`, dataDir], { encoding: 'utf8' });
    if (chown.status !== 0) throw new Error(`Could not hand ${dataDir} to ${MARIADB_SYSTEM_USER}: ${chown.stderr.trim()}`);
  }
  chmodSync(dataDir, 0o700);
}

const quote = (value: string) => `'${value.replace(/\\/g, '\\\\').replace(/'/g, "\\'")}'`;

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
  mkdirSync(files, { recursive: true });
  closeSync(openSync(log, 'a'));
  const account = serverAccount(dataDir);
  handOver(dataDir, account);
  // The database account our own statements use: root, or one named after the ordinary user starting us.
  const asRoot = process.getuid?.() === 0;
  const adminUser = asRoot ? 'root' : userInfo().username;
  // --user matters only when started by root (mariadbd then switches to that account).
  const runAs = asRoot ? [`--user=${account?.name ?? 'root'}`] : [];

  if (!existsSync(path.join(files, 'mysql'))) {
    const init = spawnSync(
      binary('mariadb-install-db'),
      [
        '--no-defaults',
        `--datadir=${files}`,
        ...runAs,
        '--auth-root-authentication-method=socket',
        `--auth-root-socket-user=${adminUser}`,
        '--skip-test-db',
        '--skip-name-resolve',
      ],
      { encoding: 'utf8' },
    );
    if (init.status !== 0) throw new Error(`mariadb-install-db failed:\n${init.stdout}\n${init.stderr}`);
  }

  const admin = binary('mariadb-admin');
  // `ping` answers 0 whenever the server runs, even when the sign-in is refused.
  const ping = () =>
    spawnSync(admin, ['--no-defaults', `--socket=${socket}`, `-u${adminUser}`, 'ping'], { encoding: 'utf8' }).status === 0;

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
        ...runAs,
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
  const sql = (statement: string, as = adminUser) => {
    const r = spawnSync(client, ['--no-defaults', `--socket=${socket}`, `-u${as}`, '-N', '-B', '-e', statement], {
      encoding: 'utf8',
    });
    if (r.status !== 0) throw new Error(`MariaDB statement failed: ${r.stderr.trim()}`);
    return r.stdout;
  };
  secureAccounts(sql, adminUser);
  // The app's account over loopback TCP (127.0.0.1) and over the unix socket (localhost), one password.
  const apps = [`${quote(options.user)}@'127.0.0.1'`, `${quote(options.user)}@'localhost'`];
  sql(
    [
      ...options.databases.map(
        (db) => `CREATE DATABASE IF NOT EXISTS \`${db}\` CHARACTER SET utf8mb4 COLLATE utf8mb4_unicode_ci`,
      ),
      ...apps.flatMap((app) => [
        `CREATE USER IF NOT EXISTS ${app} IDENTIFIED BY ${quote(options.password)}`,
        // Also takes back what earlier starts granted on *.* (FILE and the rest).
        `REVOKE ALL PRIVILEGES, GRANT OPTION FROM ${app}`,
        ...(options.grants ?? options.databases).map((db) => `GRANT ALL PRIVILEGES ON \`${db}\`.* TO ${app}`),
      ]),
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
      spawnSync(admin, ['--no-defaults', `--socket=${socket}`, `-u${adminUser}`, 'shutdown'], { encoding: 'utf8' });
      const deadline = Date.now() + 20_000;
      const running = () => (child ? child.exitCode === null && child.signalCode === null : ping());
      while (running() && Date.now() < deadline) await sleep(100);
      if (child && running()) child.kill('SIGKILL');
    },
  };
}

/**
 * root signs in through the socket as the operating-system root only; an ordinary user starting the server
 * gets an account of their own name, the same way. Removes what older data folders had: root without a
 * password, root over TCP (127.0.0.1, ::1, the host name) and anonymous accounts. Idempotent.
 */
function secureAccounts(sql: (statement: string, as?: string) => string, adminUser: string) {
  // A data folder made by an older start: root had no password; this is the one time we sign in that way.
  let as = adminUser;
  try {
    sql('SELECT 1');
  } catch {
    as = 'root';
  }
  const extra = sql("SELECT CONCAT(QUOTE(user), '@', QUOTE(host)) FROM mysql.user WHERE (user = 'root' AND host <> 'localhost') OR user = ''", as)
    .split('\n')
    .filter(Boolean);
  sql(
    [
      ...(adminUser === 'root'
        ? []
        : [`CREATE USER IF NOT EXISTS ${quote(adminUser)}@'localhost' IDENTIFIED VIA unix_socket`, `GRANT ALL PRIVILEGES ON *.* TO ${quote(adminUser)}@'localhost' WITH GRANT OPTION`]),
      ...extra.map((account) => `DROP USER ${account}`),
      "ALTER USER 'root'@'localhost' IDENTIFIED VIA unix_socket",
      'FLUSH PRIVILEGES',
    ].join(';'),
    as,
  );
}
