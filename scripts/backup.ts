/** `npm run backup -- FILE`: writes a consistent, gzip-compressed dump of the database, run files included. */
import { loadConfig } from '../server/config';
import { runBackupCommand } from './lib/backup-command';
import { backupDatabase } from './lib/backup';

await runBackupCommand('backup', (file) => backupDatabase(loadConfig(), file, console.log));
