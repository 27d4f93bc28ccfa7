import { spawn, type ChildProcess } from 'node:child_process';
import fs from 'node:fs';
import net from 'node:net';
import os from 'node:os';
import path from 'node:path';
import type { TestProject } from 'vitest/node';
import { ensureWebBuild } from '../../server/web-build';

declare module 'vitest' {
  export interface ProvidedContext {
    baseURL: string;
  }
}

const root = path.resolve(__dirname, '../..');

const freePort = () =>
  new Promise<number>((resolve) => {
    const s = net.createServer().listen(0, '127.0.0.1', () => {
      const { port } = s.address() as net.AddressInfo;
      s.close(() => resolve(port));
    });
  });

export type RunningServer = { baseURL: string; dataDir: string; stop(): void };

/** Runs the real server (`server/start.ts`, as `npm start` does) on a fresh demo database in a temporary folder. */
export async function startServer(): Promise<RunningServer> {
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'yieldpoint-e2e-'));
  const port = await freePort();
  const child: ChildProcess = spawn(process.execPath, ['--import', 'tsx', 'server/start.ts'], {
    cwd: root,
    env: { ...process.env, PORT: String(port), HOST: '127.0.0.1', DATABASE_FILE: path.join(dir, 'e2e.db'), SKIP_WEB_BUILD: '1' },
    stdio: ['ignore', 'pipe', 'pipe'],
  });
  let output = '';
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
    child.on('exit', (code) => reject(new Error(`server exited with ${code}:\n${output}`)));
  });
  return {
    baseURL: `http://127.0.0.1:${port}`,
    dataDir: dir,
    stop: () => {
      child.kill('SIGTERM');
      fs.rmSync(dir, { recursive: true, force: true });
    },
  };
}

/** Builds the web app if needed and starts the server every e2e file shares. */
export default async function setup(project: TestProject) {
  ensureWebBuild(root, 'dist');
  const server = await startServer();
  project.provide('baseURL', server.baseURL);
  return () => server.stop();
}
