import Database from 'better-sqlite3';
import fs from 'node:fs';
import path from 'node:path';

export type BackupCheck = { integrity: string; foreignKeyErrors: number; tables: Record<string, number> };

/** Integrity, foreign keys and row counts of a database file, opened read-only. */
export function checkDatabase(file: string): BackupCheck {
  const db = new Database(file, { readonly: true, fileMustExist: true });
  try {
    const integrity = (db.pragma('integrity_check', { simple: true }) as string) ?? 'unknown';
    const foreignKeyErrors = (db.pragma('foreign_key_check') as unknown[]).length;
    const names = db.prepare(`select name from sqlite_master where type = 'table' and name not like 'sqlite_%' order by name`).all() as { name: string }[];
    const tables = Object.fromEntries(names.map(({ name }) => [name, (db.prepare(`select count(*) as n from "${name}"`).get() as { n: number }).n]));
    return { integrity, foreignKeyErrors, tables };
  } finally {
    db.close();
  }
}

/**
 * Copies a live database with SQLite's online backup API: consistent even while the server writes,
 * unlike a file copy that can catch the database file and its WAL at different moments.
 */
export async function backupDatabase(source: string, target: string): Promise<BackupCheck> {
  fs.mkdirSync(path.dirname(path.resolve(target)), { recursive: true });
  const db = new Database(source, { fileMustExist: true });
  try {
    db.pragma('busy_timeout = 5000');
    await db.backup(target);
  } finally {
    db.close();
  }
  const check = checkDatabase(target);
  if (check.integrity !== 'ok') throw new Error(`backup failed its integrity check: ${check.integrity}`);
  return check;
}

/** Replaces the database at `target` with a checked backup. The server must be stopped. */
export async function restoreDatabase(backup: string, target: string): Promise<BackupCheck> {
  const check = checkDatabase(backup);
  if (check.integrity !== 'ok' || check.foreignKeyErrors)
    throw new Error(`refusing to restore: integrity ${check.integrity}, ${check.foreignKeyErrors} foreign-key errors`);
  for (const suffix of ['-wal', '-shm']) fs.rmSync(target + suffix, { force: true });
  const src = new Database(backup, { readonly: true });
  try {
    await src.backup(target);
  } finally {
    src.close();
  }
  return checkDatabase(target);
}
