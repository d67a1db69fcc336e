import type { ChildProcess } from 'node:child_process';

/**
 * Waits up to 60 s until `url` (the server's `/api/health`) answers OK; with `server`, fails at once when that
 * process exits first.
 */
export async function waitForHealth(url: string, server?: ChildProcess): Promise<void> {
  const deadline = Date.now() + 60_000;
  for (;;) {
    if (server && server.exitCode !== null) throw new Error(`The server exited (code ${server.exitCode}) before answering`);
    try {
      if ((await fetch(url)).ok) return;
    } catch {
      // not listening yet
    }
    if (Date.now() > deadline) throw new Error(`The server did not answer at ${url}`);
    await new Promise((r) => setTimeout(r, 250));
  }
}
