/** The command-line side of backup and restore: one FILE argument, a one-line message on failure, exit codes. */
import { BackupError } from './backup';

const USAGE = {
  backup: 'Usage: npm run backup -- FILE   (writes a gzip-compressed dump; FILE must not exist yet, e.g. phasewright-2026-12-03.sql.gz)',
  restore: 'Usage: npm run restore -- FILE   (loads a backup into an empty database)',
};

/** Exit codes: 0 done, 1 refused or failed (the message says why), 2 wrong arguments. */
export async function runBackupCommand(command: 'backup' | 'restore', job: (file: string) => Promise<void>): Promise<void> {
  const args = process.argv.slice(2);
  if (args.length !== 1 || args[0].startsWith('-')) {
    console.error(USAGE[command]);
    process.exit(2);
  }
  try {
    await job(args[0]);
  } catch (err) {
    const message = err instanceof Error ? err.message : String(err);
    console.error(err instanceof BackupError ? message : `The ${command} failed: ${message}`);
    process.exit(1);
  }
}
