import path from 'node:path';
import { backupDatabase, restoreDatabase } from '../db/backup';
import { removeDatabase } from '../db/reset';
import { readEnv } from './env';

// npm run backup [-- <file>]   online backup of DATABASE_FILE (default backups/yieldpoint-<time>.db)
// npm run restore -- <file>    replace DATABASE_FILE with a checked backup; stop the server first
// npm run db:reset              delete DATABASE_FILE; the next npm start creates the demo site again
async function main() {
  const [command, file] = process.argv.slice(2);
  const { databaseFile } = readEnv();
  if (command === 'backup') {
    const target = file ?? path.join('backups', `yieldpoint-${new Date().toISOString().replace(/[:.]/g, '-')}.db`);
    const check = await backupDatabase(databaseFile, target);
    console.log(`Backed up ${databaseFile} to ${target}: integrity ${check.integrity}, ${Object.values(check.tables).reduce((a, b) => a + b, 0)} rows.`);
  } else if (command === 'restore' && file) {
    const check = await restoreDatabase(file, databaseFile);
    console.log(`Restored ${file} into ${databaseFile}: integrity ${check.integrity}.`);
  } else if (command === 'reset') {
    removeDatabase(databaseFile);
    console.log(`Removed ${databaseFile}. Run npm start to create the demo site again.`);
  } else {
    throw new Error('usage: backup-cli backup [file] | restore <file> | reset');
  }
}

main().catch((err) => {
  console.error(err instanceof Error ? err.message : err);
  process.exit(1);
});
