/** A private redis-server on loopback (Debian's package), for the run queue in RUN_QUEUE=redis and for tests. */
import { spawn, spawnSync } from 'node:child_process';
import { existsSync, mkdirSync } from 'node:fs';
import path from 'node:path';
import { binary } from './mariadb';

export interface RedisOptions {
  port: number;
  /** Where the append-only file lives; null: nothing kept on disk (tests). */
  dataDir: string | null;
  /** Required of clients when set (redis://:password@host:port). */
  password?: string;
}

export interface RunningRedis {
  port: number;
  url: string;
  stop(): Promise<void>;
}

const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

export function redisBinary(): string {
  try {
    return binary('redis-server');
  } catch {
    throw new Error("redis-server not found — install Debian's redis-server package (apt-get install -y redis-server)");
  }
}

export async function startRedis(options: RedisOptions): Promise<RunningRedis> {
  const args = ['--port', String(options.port), '--bind', '127.0.0.1', '--protected-mode', 'yes', '--save', '', '--daemonize', 'no', '--loglevel', 'warning'];
  if (options.dataDir) {
    const dir = path.resolve(options.dataDir);
    mkdirSync(dir, { recursive: true, mode: 0o700 });
    args.push('--dir', dir, '--appendonly', 'yes', '--appendfsync', 'everysec');
  } else {
    args.push('--appendonly', 'no');
  }
  if (options.password) args.push('--requirepass', options.password);
  // BullMQ keeps jobs that must never be evicted.
  args.push('--maxmemory-policy', 'noeviction');
  const child = spawn(redisBinary(), args, { stdio: ['ignore', 'ignore', 'pipe'], detached: true });
  let errors = '';
  child.stderr?.on('data', (d: Buffer) => (errors += d.toString()));
  const auth = options.password ? ['-a', options.password, '--no-auth-warning'] : [];
  const cli = existsSync('/usr/bin/redis-cli') ? '/usr/bin/redis-cli' : 'redis-cli';
  const ping = () => spawnSync(cli, ['-p', String(options.port), ...auth, 'ping'], { encoding: 'utf8' }).stdout?.trim() === 'PONG';
  const deadline = Date.now() + 15_000;
  while (!ping()) {
    if (child.exitCode !== null || Date.now() > deadline) throw new Error(`redis-server did not start on port ${options.port}: ${errors.trim()}`);
    await sleep(100);
  }
  const url = `redis://${options.password ? `:${encodeURIComponent(options.password)}@` : ''}127.0.0.1:${options.port}`;
  return {
    port: options.port,
    url,
    async stop() {
      if (child.exitCode !== null) return;
      child.kill('SIGTERM');
      const end = Date.now() + 10_000;
      while (child.exitCode === null && child.signalCode === null && Date.now() < end) await sleep(50);
      if (child.exitCode === null && child.signalCode === null) child.kill('SIGKILL');
    },
  };
}
