import { first } from '../../db/client';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import zlib from 'node:zlib';
import { sql } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { auditEvents, certificateFiles } from '../../db/tables';
import { createFileStore } from '../../server/file-store';
import { startTestApp, type Client, type Reply, type TestApp } from './harness';

// A zip bomb made here by hand: one entry of 64 MB of zeros, deflated to some 64 KB. Format after PKWARE's
// APPNOTE.TXT (local file header, central directory header, end of central directory record; from memory).
const INFLATED_BYTES = 64 * 1024 * 1024;

function zipOf(name: string, content: Buffer): Buffer {
  const data = zlib.deflateRawSync(content, { level: 9 });
  const crc = zlib.crc32(content);
  const fileName = Buffer.from(name);
  const local = Buffer.alloc(30);
  local.writeUInt32LE(0x04034b50, 0);
  local.writeUInt16LE(20, 4); // version needed
  local.writeUInt16LE(8, 8); // deflate
  local.writeUInt32LE(crc, 14);
  local.writeUInt32LE(data.length, 18);
  local.writeUInt32LE(content.length, 22);
  local.writeUInt16LE(fileName.length, 26);
  const central = Buffer.alloc(46);
  central.writeUInt32LE(0x02014b50, 0);
  central.writeUInt16LE(20, 4);
  central.writeUInt16LE(20, 6);
  central.writeUInt16LE(8, 10);
  central.writeUInt32LE(crc, 16);
  central.writeUInt32LE(data.length, 20);
  central.writeUInt32LE(content.length, 24);
  central.writeUInt16LE(fileName.length, 28);
  central.writeUInt32LE(0, 42); // offset of the local header
  const centralStart = local.length + fileName.length + data.length;
  const end = Buffer.alloc(22);
  end.writeUInt32LE(0x06054b50, 0);
  end.writeUInt16LE(1, 8);
  end.writeUInt16LE(1, 10);
  end.writeUInt32LE(central.length + fileName.length, 12);
  end.writeUInt32LE(centralStart, 16);
  return Buffer.concat([local, fileName, data, central, fileName, end]);
}

const BOMB = zipOf('certificate.pdf', Buffer.alloc(INFLATED_BYTES));

let t: TestApp;
let filesDir: string;
let procurement: Client;
beforeAll(async () => {
  filesDir = fs.mkdtempSync(path.join(os.tmpdir(), 'yieldpoint-upload-test-'));
  t = await startTestApp({ files: createFileStore(filesDir) });
  procurement = await t.signIn('procurement');
});
afterAll(async () => {
  await t.close();
  fs.rmSync(filesDir, { recursive: true, force: true });
});

async function upload(c: Client, urlPath: string, name: string, bytes: Buffer, type: string): Promise<Reply> {
  const form = new FormData();
  form.append('file', new Blob([new Uint8Array(bytes)], { type }), name);
  const res = await fetch(t.base + urlPath, { method: 'POST', headers: { 'x-yieldpoint-client': 'test', cookie: c.cookie ?? '' }, body: form });
  const text = await res.text();
  return { status: res.status, body: text ? JSON.parse(text) : null, headers: res.headers };
}

const lotId = async (code: string) => ((await procurement.get('/api/lots')).body.lots as { id: number; lotCode: string }[]).find((l) => l.lotCode === code)!.id;
const count = async (table: typeof certificateFiles | typeof auditEvents) =>
  (await t.db
    .select({ n: sql<number>`count(*)`.mapWith(Number) })
    .from(table)
    .then(first))!.n;
/** Every file under the store's folder, with its size: an unpacked entry would show up here. */
const stored = () =>
  fs
    .readdirSync(filesDir, { recursive: true, withFileTypes: true })
    .filter((e) => e.isFile())
    .map((e) => fs.statSync(path.join(e.parentPath, e.name)).size);

describe('an uploaded archive', () => {
  it('is a real zip bomb: the test file inflates to 64 MB', () => {
    expect(BOMB.readUInt32LE(0)).toBe(0x04034b50);
    expect(BOMB.length).toBeLessThan(200 * 1024);
    expect(zlib.inflateRawSync(BOMB.subarray(30 + 'certificate.pdf'.length)).length).toBe(INFLATED_BYTES);
  });

  it('is refused as a certificate, by its zip name or a PDF name, and nothing lands in the files folder', async () => {
    const id = await lotId('CGA-2611-07');
    const certs0 = await count(certificateFiles);
    const audit0 = await count(auditEvents);
    for (const [name, type] of [
      ['coa.zip', 'application/zip'],
      ['coa.pdf', 'application/pdf'],
    ]) {
      const r = await upload(procurement, `/api/lots/${id}/certificate`, name, BOMB, type);
      expect(r.status, name).toBe(415);
      expect(r.body.error.code, name).toBe('unsupported_type');
    }
    expect(stored()).toEqual([]);
    expect(await count(certificateFiles)).toBe(certs0);
    expect(await count(auditEvents)).toBe(audit0);
    expect((await procurement.get(`/api/lots/${id}/certificate`)).status).toBe(404);
  });

  it('is refused as an assay table without being read as an archive', async () => {
    const id = await lotId('CGA-2611-07');
    const r = await upload(procurement, `/api/lots/${id}/assays`, 'assay.csv', BOMB, 'text/csv');
    expect(r.status).toBe(400);
    expect(r.body.error.code).toBe('not_text');
    expect(stored()).toEqual([]);
  });

  it('inside a file that starts as a PDF is stored byte for byte, never unpacked', async () => {
    const id = await lotId('CGA-2611-07');
    const pdfWithZip = Buffer.concat([Buffer.from('%PDF-1.7\n'), BOMB]);
    const r = await upload(procurement, `/api/lots/${id}/certificate`, 'coa.pdf', pdfWithZip, 'application/pdf');
    expect(r.status).toBe(201);
    expect(r.body.sizeBytes).toBe(pdfWithZip.length);
    expect(stored()).toEqual([pdfWithZip.length]);
    const back = await fetch(`${t.base}/api/lots/${id}/certificate`, { headers: { cookie: procurement.cookie! } });
    expect(Buffer.from(await back.arrayBuffer()).equals(pdfWithZip)).toBe(true);
  });
});
