import { spawn } from 'node:child_process';
import path from 'node:path';
import { readEnv } from './env';

// Development: the API server (with reload) and Metro side by side; Metro forwards /api to the server.
const env = readEnv();
const root = path.resolve(__dirname, '..');
const children = [
  spawn('npx', ['tsx', 'watch', 'server/start.ts'], { cwd: root, stdio: 'inherit', env: { ...process.env, SKIP_WEB_BUILD: '1', PORT: String(env.apiPort) } }),
  spawn('npx', ['expo', 'start', '--web', '--port', '8081'], { cwd: root, stdio: 'inherit', env: { ...process.env, API_PORT: String(env.apiPort) } }),
];
const stop = () => children.forEach((c) => c.kill('SIGTERM'));
process.on('SIGINT', stop);
process.on('SIGTERM', stop);
