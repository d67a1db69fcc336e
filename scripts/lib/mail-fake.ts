/** The local mail fake (maildev) on loopback: catches every mail the app sends, readable over HTTP. */
import { spawn } from 'node:child_process';
import path from 'node:path';

export interface RunningMailFake {
  smtpPort: number;
  webPort: number;
  stop(): Promise<void>;
}

async function answering(webPort: number): Promise<boolean> {
  try {
    return (await fetch(`http://127.0.0.1:${webPort}/api/email`)).ok;
  } catch {
    return false;
  }
}

export async function startMailFake(smtpPort: number, webPort: number, root = process.cwd()): Promise<RunningMailFake> {
  // One left running by an earlier start that ended abruptly is used as it is (and left running).
  if (await answering(webPort)) return { smtpPort, webPort, stop: async () => undefined };
  const bin = path.join(root, 'node_modules', '.bin', 'maildev');
  const child = spawn(
    bin,
    ['--smtp', String(smtpPort), '--web', String(webPort), '--ip', '127.0.0.1', '--web-ip', '127.0.0.1', '--silent'],
    { stdio: ['ignore', 'ignore', 'pipe'], detached: true },
  );
  let stderr = '';
  child.stderr?.on('data', (chunk) => (stderr += String(chunk)));
  const deadline = Date.now() + 20_000;
  for (;;) {
    if (child.exitCode !== null) throw new Error(`The mail fake (maildev) exited: ${stderr.trim()}`);
    if (await answering(webPort)) break;
    if (Date.now() > deadline) throw new Error(`The mail fake did not start on port ${webPort}: ${stderr.trim()}`);
    await new Promise((r) => setTimeout(r, 200));
  }
  return {
    smtpPort,
    webPort,
    async stop() {
      if (child.exitCode !== null) return;
      child.kill('SIGTERM');
      await new Promise((r) => {
        child.once('exit', r);
        setTimeout(r, 5000);
      });
    },
  };
}
