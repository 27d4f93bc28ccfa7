import { spawnSync } from 'node:child_process';
import fs from 'node:fs';
import path from 'node:path';
import zlib from 'node:zlib';
import { readEnv } from '../env';
import { filesUnder } from '../web-pages';
import { writeOffline } from './offline';
import { renderOverSnapshots, splitBundle } from './rewrite';

// Build time only (`npm start` before it listens, `npm run build:web`, the e2e and Lighthouse set-ups): the API
// server never imports this folder, so neither React (the pages' snapshot render) nor Workbox load in it.

/**
 * `finished`: Expo's export with the steps of `rewrite.ts` (no hydration, the warm-up order, the bundle in parts).
 * `plain`: Expo's export as it is, with only what adds files beside it (manifest, icons, service worker, compressed
 * copies): the off switch (WEB_PIPELINE=plain) for when an upgrade has broken a step.
 */
export type WebPipeline = 'finished' | 'plain';

const EXPORT_SOURCES = ['app', 'src', 'assets', 'index.ts', 'app.json', 'package.json', 'package-lock.json', 'metro.config.js'];
const FINISH_SOURCES = ['server/web-build', 'server/web-pages.ts'];
/** Expo's own export, kept as it came, so the steps run on a copy and a switch of pipeline needs no new export. */
export const exportDirOf = (root: string) => path.join(root, 'node_modules/.cache/yieldpoint-web-export');
/** Written last into a finished folder: which pipeline made it from which export. */
const RECORD = '.web-build.json';
// Text files are stored compressed beside themselves once, at build time, at the highest levels (brotli 11 is
// ~20 % smaller than gzip on the bundle but far too slow to run per request). Fonts are WOFF2, compressed already.
const COMPRESSIBLE = /\.(js|css|html|json|svg|txt)$/;

function newestMtime(p: string): number {
  if (!fs.existsSync(p)) return 0;
  const st = fs.statSync(p);
  if (!st.isDirectory()) return st.mtimeMs;
  let newest = st.mtimeMs;
  for (const entry of fs.readdirSync(p)) newest = Math.max(newest, newestMtime(path.join(p, entry)));
  return newest;
}

const mtimeOf = (file: string) => (fs.existsSync(file) ? fs.statSync(file).mtimeMs : 0);

/** Runs `expo export --platform web` when its output is missing or older than any of its sources; returns its folder. */
export function ensureExport(root: string): string {
  const dir = exportDirOf(root);
  const builtAt = mtimeOf(path.join(dir, 'index.html'));
  if (builtAt >= Math.max(...EXPORT_SOURCES.map((s) => newestMtime(path.join(root, s))))) return dir;
  console.log(builtAt ? 'Web app sources changed: exporting again…' : 'Exporting the web app (first run, about a minute)…');
  fs.rmSync(dir, { recursive: true, force: true });
  const r = spawnSync('npx', ['expo', 'export', '--platform', 'web', '--output-dir', dir], {
    cwd: root,
    stdio: ['ignore', 'inherit', 'inherit'],
    env: { ...process.env, CI: '1', EXPO_NO_TELEMETRY: '1' },
  });
  if (r.status !== 0) {
    fs.rmSync(path.join(dir, 'index.html'), { force: true });
    throw new Error(`expo export failed with exit code ${r.status}`);
  }
  return dir;
}

/** Makes `webDir` (relative to `root`) from the current export by `pipeline`, unless it is already made so. */
export async function ensureWebBuild(root: string, webDir: string, pipeline: WebPipeline = 'finished'): Promise<void> {
  const from = ensureExport(root);
  const to = path.resolve(root, webDir);
  const record = JSON.stringify({ pipeline, exportedAt: mtimeOf(path.join(from, 'index.html')) });
  const recordFile = path.join(to, RECORD);
  const current = fs.existsSync(recordFile) && fs.readFileSync(recordFile, 'utf8') === record;
  if (current && mtimeOf(recordFile) >= Math.max(...FINISH_SOURCES.map((s) => newestMtime(path.join(root, s))))) return;
  await finishExport(root, from, to, pipeline);
  fs.writeFileSync(recordFile, record);
}

/** Copies Expo's export `from` into `to` (replacing it) and runs the pipeline's steps over the copy. */
export async function finishExport(root: string, from: string, to: string, pipeline: WebPipeline): Promise<void> {
  // Only ever a folder this build made (or an export): WEB_DIR pointed at anything else is refused, not emptied.
  if (fs.existsSync(to) && fs.readdirSync(to).length && !fs.existsSync(path.join(to, '_expo'))) {
    throw new Error(`Web build: ${to} is not empty and holds no web export; choose another WEB_DIR.`);
  }
  fs.rmSync(to, { recursive: true, force: true });
  fs.cpSync(from, to, { recursive: true });
  try {
    // The server writes the session each page is served for before its `</head>` (server/web-app.ts).
    const withoutHead = filesUnder(to).filter((f) => f.endsWith('.html') && fs.readFileSync(path.join(to, f), 'utf8').split('</head>').length !== 2);
    if (withoutHead.length)
      throw new Error(`Web build: ${withoutHead.length} pages have no single </head> for the session (${withoutHead.slice(0, 3).join(', ')}).`);
    if (pipeline === 'finished') {
      renderOverSnapshots(to);
      splitBundle(to);
    }
    // Over the finished pages and parts, so the service worker precaches what the server will serve.
    const offline = await writeOffline(root, to);
    console.log(`Web build (${pipeline}): service worker precaches ${offline.precached} files (${(offline.bytes / 1024).toFixed(0)} KB).`);
    precompress(to);
  } catch (err) {
    // A half-finished folder must not pass for a finished one on the next start.
    fs.rmSync(path.join(to, 'index.html'), { force: true });
    throw err;
  }
}

/** Writes `<file>.br` and `<file>.gz` beside every text file of the export (served by express-static-gzip). */
export function precompress(dir: string): void {
  for (const rel of filesUnder(dir).filter((f) => COMPRESSIBLE.test(f))) {
    const file = path.join(dir, rel);
    const body = fs.readFileSync(file);
    fs.writeFileSync(
      `${file}.br`,
      zlib.brotliCompressSync(body, { params: { [zlib.constants.BROTLI_PARAM_QUALITY]: 11, [zlib.constants.BROTLI_PARAM_SIZE_HINT]: body.length } }),
    );
    fs.writeFileSync(`${file}.gz`, zlib.gzipSync(body, { level: 9 }));
  }
}

// `npm run build:web`: the folder `npm start` serves (WEB_DIR), made as `npm start` makes it.
if (require.main === module) {
  const env = readEnv();
  ensureWebBuild(path.resolve(__dirname, '../..'), env.webDir, env.webPipeline).catch((err: unknown) => {
    console.error(err instanceof Error ? err.message : err);
    process.exit(1);
  });
}
