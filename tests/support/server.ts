import { spawn, type ChildProcess } from 'node:child_process';
import fs from 'node:fs';
import net from 'node:net';
import os from 'node:os';
import path from 'node:path';

export const ROOT = path.resolve(__dirname, '../..');

export const freePort = () =>
  new Promise<number>((resolve) => {
    const s = net.createServer().listen(0, '127.0.0.1', () => {
      const { port } = s.address() as net.AddressInfo;
      s.close(() => resolve(port));
    });
  });

export type RunningServer = { baseURL: string; dir: string; databaseFile: string; child: ChildProcess; stop(): Promise<void> };

/**
 * Runs the real server (`server/start.ts`, as `npm start` does) on a fresh demo database in a temp folder,
 * on loopback only. The web app must already be exported to dist/.
 */
export async function startServer(opts: { dir?: string; env?: Record<string, string>; nodeArgs?: string[] } = {}): Promise<RunningServer> {
  const dir = opts.dir ?? fs.mkdtempSync(path.join(os.tmpdir(), 'yieldpoint-'));
  const databaseFile = path.join(dir, 'yieldpoint.db');
  const port = await freePort();
  const child = spawn(process.execPath, [...(opts.nodeArgs ?? []), '--import', 'tsx', 'server/start.ts'], {
    cwd: ROOT,
    env: { ...process.env, PORT: String(port), HOST: '127.0.0.1', DATABASE_FILE: databaseFile, SKIP_WEB_BUILD: '1', PLANT_SIM_PORT: '0', ...opts.env },
    stdio: ['ignore', 'pipe', 'pipe'],
  });
  let output = '';
  if (process.env.YP_SERVER_LOG) {
    const log = fs.createWriteStream(process.env.YP_SERVER_LOG);
    child.stdout!.pipe(log);
    child.stderr!.pipe(log);
  }
  await new Promise<void>((resolve, reject) => {
    const timer = setTimeout(() => reject(new Error(`server did not start:\n${output}`)), 60_000);
    const onData = (d: Buffer) => {
      output += d.toString();
      if (output.includes('Yieldpoint is running')) {
        clearTimeout(timer);
        resolve();
      }
    };
    child.stdout!.on('data', onData);
    child.stderr!.on('data', onData);
    child.once('exit', (code) => {
      clearTimeout(timer);
      reject(new Error(`server exited with ${code}:\n${output}`));
    });
  });
  return {
    baseURL: `http://127.0.0.1:${port}`,
    dir,
    databaseFile,
    child,
    stop: () =>
      new Promise<void>((resolve) => {
        if (child.exitCode !== null || child.signalCode !== null) return resolve();
        child.once('exit', () => resolve());
        child.kill('SIGTERM');
      }),
  };
}

/** Signs in over HTTP and returns the session cookie, with the first-run notice already acknowledged. */
export async function sessionCookie(baseURL: string, email: string, password: string): Promise<string> {
  const headers = { 'content-type': 'application/json', 'x-yieldpoint-client': 'script' };
  const res = await fetch(`${baseURL}/api/session`, { method: 'POST', headers, body: JSON.stringify({ email, password }) });
  if (res.status !== 201) throw new Error(`sign-in as ${email} failed with ${res.status}`);
  const cookie = res.headers.get('set-cookie')!.split(';')[0]!;
  await fetch(`${baseURL}/api/session`, { method: 'PATCH', headers: { ...headers, cookie }, body: JSON.stringify({ cautionsAcknowledged: true }) });
  return cookie;
}
