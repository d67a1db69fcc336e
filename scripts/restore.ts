/** `npm run restore -- FILE`: loads a backup written by `npm run backup` into an empty database. */
import { loadConfig } from '../server/config';
import { runBackupCommand } from './lib/backup-command';
import { restoreDatabase } from './lib/backup';

await runBackupCommand('restore', (file) => restoreDatabase(loadConfig(), file, console.log));
