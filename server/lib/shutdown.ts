import type { Logger } from 'pino';

/** Longest a process takes to stop before it exits anyway. */
const SHUTDOWN_LIMIT_MS = 10_000;

/**
 * Stops the process once, on SIGTERM, SIGINT or — when the start command launched it with an IPC channel — when
 * that command goes away without stopping it: logs `what` with the reason, runs `stop`, then exits 0; past
 * 10 s it logs so and exits 1. Shared by the web server (index.ts) and the run worker (worker-main.ts).
 */
export function stopOnSignals(logger: Logger, what: string, stop: () => Promise<void>): void {
  let stopping = false;
  const run = async (reason: string) => {
    if (stopping) return;
    stopping = true;
    logger.info({ signal: reason }, what);
    setTimeout(() => {
      logger.error(`${what} took longer than ${SHUTDOWN_LIMIT_MS / 1000} s; exiting`);
      process.exit(1);
    }, SHUTDOWN_LIMIT_MS).unref();
    await stop();
    process.exit(0);
  };
  process.on('SIGTERM', () => void run('SIGTERM'));
  process.on('SIGINT', () => void run('SIGINT'));
  if (process.send) process.on('disconnect', () => void run('start command exited'));
}
