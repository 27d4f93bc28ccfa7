import path from 'node:path';
import { backupDatabase, restoreDatabase } from '../db/backup';
import { readEnv } from './env';

// npm run backup [-- <file>]   online backup of DATABASE_FILE (default backups/yieldpoint-<time>.db)
// npm run restore -- <file>    replace DATABASE_FILE with a checked backup; stop the server first
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
  } else {
    throw new Error('usage: backup-cli backup [file] | restore <file>');
  }
}

main().catch((err) => {
  console.error(err instanceof Error ? err.message : err);
  process.exit(1);
});
