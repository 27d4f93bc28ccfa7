import { sqliteClient } from '../../db/client';
import Database from 'better-sqlite3';
import { execFileSync } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { startTestApp, type Client, type TestApp } from './harness';

// The database file cannot be written (another connection holds the write lock, the file is read-only, the disk
// is full): reads answer, writes answer 503 and change nothing, refused calls are still answered, nothing ends
// the process (an uncaught throw would fail this file), and writing resumes by itself once the file can be written.
let dir: string;
let file: string;
let t: TestApp;
let admin: Client;

beforeEach(async () => {
  dir = fs.mkdtempSync(path.join(os.tmpdir(), 'yieldpoint-unwritable-'));
  file = path.join(dir, 'yieldpoint.db');
  t = await startTestApp({}, { file });
  admin = await t.signIn('admin');
});
afterEach(async () => {
  await t.close();
  fs.rmSync(dir, { recursive: true, force: true });
});

const userName = (id: number) => (sqliteClient(t.db).prepare('select name from users where id = ?').get(id) as { name: string }).name;
const auditCount = () => (sqliteClient(t.db).prepare('select count(*) as n from audit_events').get() as { n: number }).n;
const settle = () => new Promise((r) => setTimeout(r, 20));

/** What every kind of failure must look like from outside while it lasts. */
async function expectReadOnlyBehaviour(): Promise<void> {
  // An anonymous refused call (its audit row cannot be written): answered, and the process lives on.
  expect((await t.client().get('/api/users')).status).toBe(401);
  await settle();
  const users = await admin.get('/api/users');
  expect(users.status).toBe(200);
  const before = { name: userName(2), audit: auditCount() };
  const started = performance.now();
  const write = await admin.patch('/api/users/2', { name: 'Renamed while unwritable' });
  expect(write.status).toBe(503);
  expect(write.body.error.code).toBe('database_unwritable');
  expect(write.body.error.message).toMatch(/nothing was saved; reading still works/);
  expect(write.headers.get('retry-after')).toBe('10');
  // Once the file is known not writable, a write no longer waits for the busy timeout.
  expect(performance.now() - started).toBeLessThan(1000);
  expect({ name: userName(2), audit: auditCount() }).toEqual(before);
  expect((await admin.get('/api/lots')).status).toBe(200);
}

async function expectRecovered(): Promise<void> {
  const write = await admin.patch('/api/users/2', { name: 'Renamed after recovery' });
  expect(write.status).toBe(200);
  expect(userName(2)).toBe('Renamed after recovery');
}

describe('a database that cannot be written', () => {
  it('another connection holds BEGIN IMMEDIATE: reads answer, writes 503, then writing resumes', async () => {
    const holder = new Database(file);
    holder.exec('BEGIN IMMEDIATE');
    try {
      await expectReadOnlyBehaviour();
    } finally {
      holder.exec('ROLLBACK');
      holder.close();
    }
    await expectRecovered();
  }, 30_000);

  // Root ignores file modes, so the file is made immutable (ext4/tmpfs attribute) instead; the WAL's shared
  // memory stays writable (it is mapped: an immutable one stops the process with SIGBUS).
  const canChattr = (() => {
    try {
      const probe = path.join(os.tmpdir(), `yieldpoint-chattr-${process.pid}`);
      fs.writeFileSync(probe, '');
      execFileSync('chattr', ['+i', probe], { stdio: 'ignore' });
      execFileSync('chattr', ['-i', probe], { stdio: 'ignore' });
      fs.rmSync(probe);
      return true;
    } catch {
      return false;
    }
  })();
  it.skipIf(!canChattr)('the database and its WAL become read-only files: SQLITE_IOERR_WRITE is a 503, then writing resumes', async () => {
    const files = [file, `${file}-wal`];
    execFileSync('chattr', ['+i', ...files]);
    try {
      await expectReadOnlyBehaviour();
    } finally {
      execFileSync('chattr', ['-i', ...files]);
    }
    await expectRecovered();
  });

  it('the file system is full (SQLITE_FULL from max_page_count): reads answer, writes 503, then writing resumes', async () => {
    const raw = sqliteClient(t.db);
    raw.pragma('wal_checkpoint(TRUNCATE)');
    raw.pragma(`max_page_count = ${raw.pragma('page_count', { simple: true })}`);
    try {
      // Fill what is left of the last pages until SQLite needs a new one.
      let full = false;
      for (let i = 0; i < 500 && !full; i++) full = (await admin.patch('/api/users/3', { name: `Filling ${i} ${'x'.repeat(80)}` })).status === 503;
      expect(full).toBe(true);
      await expectReadOnlyBehaviour();
    } finally {
      raw.pragma('max_page_count = 4294967294');
    }
    await expectRecovered();
  });
});
