import { spawnSync } from 'node:child_process';
import fs from 'node:fs';
import path from 'node:path';

const SOURCES = ['app', 'src', 'assets', 'app.json', 'package-lock.json', 'metro.config.js'];

function newestMtime(p: string): number {
  if (!fs.existsSync(p)) return 0;
  const st = fs.statSync(p);
  if (!st.isDirectory()) return st.mtimeMs;
  let newest = st.mtimeMs;
  for (const entry of fs.readdirSync(p)) newest = Math.max(newest, newestMtime(path.join(p, entry)));
  return newest;
}

/** Exports the web app into `webDir` when it is missing or older than any of its sources. */
export function ensureWebBuild(root: string, webDir: string): void {
  const index = path.join(root, webDir, 'index.html');
  const builtAt = fs.existsSync(index) ? fs.statSync(index).mtimeMs : 0;
  const sourcesAt = Math.max(...SOURCES.map((s) => newestMtime(path.join(root, s))));
  if (builtAt >= sourcesAt) return;
  console.log(builtAt ? 'Web app sources changed: rebuilding…' : 'Building the web app (first run, about a minute)…');
  const r = spawnSync('npx', ['expo', 'export', '--platform', 'web', '--output-dir', webDir], {
    cwd: root,
    stdio: ['ignore', 'inherit', 'inherit'],
    env: { ...process.env, CI: '1', EXPO_NO_TELEMETRY: '1' },
  });
  if (r.status !== 0) throw new Error(`expo export failed with exit code ${r.status}`);
}
