import crypto from 'node:crypto';
import fs from 'node:fs';
import path from 'node:path';
import { databaseOf, installationDir, type Db } from '../../db/client';

/**
 * Signed checkpoints of the audit chains, kept outside the database: one JSON line per checkpoint in
 * `audit-checkpoints.jsonl` in the installation's folder (in memory for an in-memory database). Each names a site's
 * event count, last event id and head hash at a moment, with an HMAC made with a key derived from the audit key,
 * so deleting the newest events or rebuilding the chain no longer matches what was sealed.
 */
export type Checkpoint = { siteId: number | null; events: number; lastId: number; head: string; at: string };
type Stored = Checkpoint & { mac: string };

const memory = new WeakMap<object, string[]>();
const fileOf = (db: Db) => {
  const dir = installationDir(db);
  return dir ? path.join(dir, 'audit-checkpoints.jsonl') : null;
};

const macOf = (key: Buffer, c: Checkpoint) => {
  const sealKey = crypto.createHmac('sha256', key).update('yieldpoint audit checkpoint').digest();
  return crypto
    .createHmac('sha256', sealKey)
    .update(JSON.stringify([c.siteId, c.events, c.lastId, c.head, c.at]))
    .digest('hex');
};

function lines(db: Db): string[] {
  const file = fileOf(db);
  if (!file) return memory.get(databaseOf(db)) ?? [];
  try {
    return fs.readFileSync(file, 'utf8').split('\n').filter(Boolean);
  } catch (e) {
    if ((e as NodeJS.ErrnoException).code === 'ENOENT') return [];
    throw e;
  }
}

const parse = (line: string): Partial<Stored> | null => {
  try {
    return JSON.parse(line) as Partial<Stored>;
  } catch {
    return null;
  }
};

/** The site's checkpoints whose signature holds, oldest first, and how many lines for it do not verify. */
export function readCheckpoints(db: Db, key: Buffer, siteId: number | null): { valid: Checkpoint[]; forged: number } {
  const valid: Checkpoint[] = [];
  let forged = 0;
  for (const line of lines(db)) {
    const c = parse(line);
    if (!c || (c.siteId ?? null) !== siteId) {
      if (!c) forged++;
      continue;
    }
    const { mac, ...body } = c as Stored;
    const want = macOf(key, body);
    if (typeof mac === 'string' && mac.length === want.length && crypto.timingSafeEqual(Buffer.from(mac), Buffer.from(want))) valid.push(body);
    else forged++;
  }
  return { valid, forged };
}

/** Whether any checkpoint line names this site (signed or not): such a chain is never re-linked. */
export const hasCheckpoint = (db: Db, siteId: number | null) => lines(db).some((l) => (parse(l)?.siteId ?? null) === siteId);

/** Appends one checkpoint and flushes it to disk before returning. */
export function appendCheckpoint(db: Db, key: Buffer, c: Checkpoint): void {
  const line = `${JSON.stringify({ ...c, mac: macOf(key, c) })}\n`;
  const file = fileOf(db);
  if (!file) {
    const database = databaseOf(db);
    memory.set(database, [...(memory.get(database) ?? []), line.trim()]);
    return;
  }
  const fd = fs.openSync(file, 'a', 0o600);
  try {
    fs.writeSync(fd, line);
    fs.fsyncSync(fd);
  } finally {
    fs.closeSync(fd);
  }
}
