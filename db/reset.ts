import fs from 'node:fs';
import { readEnv } from '../server/env';

// Deletes the local database file (and its WAL files); the next `npm start` migrates and seeds it again.
const { databaseFile } = readEnv();
for (const suffix of ['', '-wal', '-shm']) fs.rmSync(databaseFile + suffix, { force: true });
console.log(`Removed ${databaseFile}. Run npm start to create the demo site again.`);
