import fs from 'node:fs';
import type { AddressInfo } from 'node:net';
import path from 'node:path';
import { simpleParser } from 'mailparser';
import { SMTPServer } from 'smtp-server';

export type SunkMail = { id: string; to: string[]; from: string; subject: string; text: string; html: string | null; receivedAt: string };

export type SmtpSink = {
  port: number;
  /** Messages received so far, oldest first. */
  messages(): SunkMail[];
  /** Resolves with the first message (already received or arriving) that matches, or rejects after `timeoutMs`. */
  waitFor(match: (m: SunkMail) => boolean, timeoutMs?: number): Promise<SunkMail>;
  close(): Promise<void>;
};

const MAX_KEPT = 200;
const MAX_MESSAGE_BYTES = 1_000_000;

/**
 * A local SMTP server for development and tests: accepts every message on loopback, keeps the last 200 in
 * memory and, with `dir`, as JSON files (the newest 200), so another process can read what was "sent".
 */
export async function startSmtpSink(opts: { port?: number; dir?: string } = {}): Promise<SmtpSink> {
  const kept: SunkMail[] = [];
  const waiters = new Set<{ match: (m: SunkMail) => boolean; resolve: (m: SunkMail) => void }>();
  let seq = 0;
  if (opts.dir) fs.mkdirSync(opts.dir, { recursive: true });

  const store = (m: SunkMail) => {
    kept.push(m);
    if (kept.length > MAX_KEPT) kept.shift();
    if (opts.dir) {
      fs.writeFileSync(path.join(opts.dir, `${m.id}.json`), JSON.stringify(m, null, 2));
      const files = fs
        .readdirSync(opts.dir)
        .filter((f) => f.endsWith('.json'))
        .sort();
      for (const f of files.slice(0, Math.max(0, files.length - MAX_KEPT))) fs.rmSync(path.join(opts.dir, f), { force: true });
    }
    for (const w of waiters) {
      if (w.match(m)) {
        waiters.delete(w);
        w.resolve(m);
      }
    }
  };

  const server = new SMTPServer({
    authOptional: true,
    disabledCommands: ['STARTTLS', 'AUTH'],
    size: MAX_MESSAGE_BYTES,
    maxClients: 20,
    logger: false,
    banner: 'Yieldpoint local mail sink',
    onData(stream, session, callback) {
      simpleParser(stream)
        .then((parsed) => {
          const id = `${Date.now()}-${String(++seq).padStart(6, '0')}`;
          store({
            id,
            to: session.envelope.rcptTo.map((r) => r.address),
            from: session.envelope.mailFrom ? session.envelope.mailFrom.address : '',
            subject: parsed.subject ?? '',
            text: parsed.text ?? '',
            html: typeof parsed.html === 'string' ? parsed.html : null,
            receivedAt: new Date().toISOString(),
          });
          callback();
        })
        .catch((e: Error) => callback(e));
    },
  });
  await new Promise<void>((resolve, reject) => {
    server.once('error', reject);
    server.listen(opts.port ?? 0, '127.0.0.1', () => resolve());
  });
  server.on('error', (e) => console.error('mail sink:', e.message));
  const port = (server as unknown as { server: { address(): AddressInfo } }).server.address().port;

  return {
    port,
    messages: () => [...kept],
    waitFor(match, timeoutMs = 10_000) {
      const found = kept.find(match);
      if (found) return Promise.resolve(found);
      return new Promise((resolve, reject) => {
        const w = { match, resolve: (m: SunkMail) => (clearTimeout(timer), resolve(m)) };
        const timer = setTimeout(() => {
          waiters.delete(w);
          reject(new Error('no matching mail arrived in the sink'));
        }, timeoutMs);
        waiters.add(w);
      });
    },
    close: () => new Promise<void>((resolve) => server.close(() => resolve())),
  };
}

/** Reads the messages a sink in another process stored in `dir`, oldest first. */
export function readSinkDir(dir: string): SunkMail[] {
  if (!fs.existsSync(dir)) return [];
  return fs
    .readdirSync(dir)
    .filter((f) => f.endsWith('.json'))
    .sort()
    .map((f) => JSON.parse(fs.readFileSync(path.join(dir, f), 'utf8')) as SunkMail);
}
