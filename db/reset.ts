import fs from 'node:fs';

/** Deletes a database file and its WAL files; the next `npm start` migrates and seeds it again. */
export function removeDatabase(databaseFile: string): void {
  for (const suffix of ['', '-wal', '-shm']) fs.rmSync(databaseFile + suffix, { force: true });
}
