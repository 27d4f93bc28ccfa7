import fs from 'node:fs';
import type { TestProject } from 'vitest/node';
import { ensureWebBuild } from '../../server/web-build/build';
import { readEnv } from '../../server/env';
import { ROOT, startServer } from '../support/server';

declare module 'vitest' {
  export interface ProvidedContext {
    baseURL: string;
  }
}

/** Builds the web app if needed and runs the real server on a fresh demo database, as `npm start` does. */
export default async function setup(project: TestProject) {
  await ensureWebBuild(ROOT, 'dist', readEnv().webPipeline);
  const server = await startServer();
  project.provide('baseURL', server.baseURL);
  return async () => {
    await server.stop();
    fs.rmSync(server.dir, { recursive: true, force: true });
  };
}
