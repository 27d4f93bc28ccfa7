import { spawnSync } from 'node:child_process';
import { createHash } from 'node:crypto';
import fs from 'node:fs';
import path from 'node:path';
import zlib from 'node:zlib';
import { SNAPSHOT_HIDDEN_MEDIA } from '../src/web/snapshot';
import { WARM_ORDER_ID } from '../src/web/warm-up';
import { writeOffline } from './web-offline';

const SOURCES = ['app', 'src', 'assets', 'index.ts', 'app.json', 'package.json', 'package-lock.json', 'metro.config.js', 'server/web-build.ts', 'server/web-offline.ts'];
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

/** Exports the web app into `webDir` when it is missing or older than any of its sources. */
export async function ensureWebBuild(root: string, webDir: string): Promise<void> {
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
  try {
    renderOverSnapshots(path.join(root, webDir));
    splitBundle(path.join(root, webDir));
    // Over the finished pages and parts, so the service worker precaches what the server will serve.
    const offline = await writeOffline(root, path.join(root, webDir));
    console.log(`Service worker: ${offline.precached} files precached (${(offline.bytes / 1024).toFixed(0)} KB).`);
    precompress(path.join(root, webDir));
  } catch (err) {
    // A half-finished export must not pass for an up-to-date one on the next start.
    fs.rmSync(index, { force: true });
    throw err;
  }
}

// Expo Router's static pages set this flag in an inline script so the app hydrates the page's HTML.
const HYDRATE_FLAG = '<script type="module">globalThis.__EXPO_ROUTER_HYDRATE__=true;</script>';
// Its head manager also writes an empty title ahead of the page's own (`app/+html.tsx`), which would win.
const EMPTY_TITLE = '<title data-rh="true"></title>';

/**
 * Takes the hydration flag out of every page, so the app renders afresh over the build-time snapshot instead of
 * hydrating it: the snapshot is rendered without a session and a screen width, which the app's first render has,
 * so the two differ by design (the role's navigation, the sidebar). The content security policy would refuse that
 * inline script anyway (it allows only `BUNDLE_LOADER`). The empty title goes too. Each page carries the order in
 * which `src/web/warm-up.ts` initialises the bundle's modules, as a JSON data block (never executed).
 */
export function renderOverSnapshots(dir: string): void {
  const order = `<script id="${WARM_ORDER_ID}" type="application/json">${JSON.stringify(warmOrder(dir))}</script>`;
  rewritePages(dir, (html) => html.replace(HYDRATE_FLAG, '').replace(EMPTY_TITLE, '').replace('</head>', `${order}</head>`));
}

/**
 * The export's modules with each one after the modules it imports (depth-first, dependencies first), from the
 * bundles' `__d(factory, id, [dependency ids])` registrations.
 */
export function warmOrder(dir: string): number[] {
  const js = path.join(dir, '_expo/static/js/web');
  const deps = new Map<number, number[]>();
  for (const f of fs.existsSync(js) ? fs.readdirSync(js).filter((n) => n.endsWith('.js')) : []) {
    for (const m of fs.readFileSync(path.join(js, f), 'utf8').matchAll(/\},(\d+),\[([^\]]*)\]\);?$/gm)) {
      deps.set(Number(m[1]), m[2]!.split(',').filter((d) => /^\d+$/.test(d)).map(Number));
    }
  }
  const order: number[] = [];
  const seen = new Set<number>();
  const visit = (root: number) => {
    // Iterative, so a deep import chain cannot overflow the stack.
    const stack: [number, number][] = [[root, 0]];
    seen.add(root);
    while (stack.length) {
      const top = stack[stack.length - 1]!;
      const next = deps.get(top[0])?.[top[1]++];
      if (next === undefined) {
        order.push(top[0]);
        stack.pop();
      } else if (!seen.has(next) && deps.has(next)) {
        seen.add(next);
        stack.push([next, 0]);
      }
    }
  };
  for (const id of [...deps.keys()].sort((a, b) => a - b)) if (!seen.has(id)) visit(id);
  return order;
}

/** The id of each page's JSON list of the bundle's parts, which `BUNDLE_LOADER` loads. */
export const BUNDLE_PARTS_ID = 'yieldpoint-bundle-parts';
/**
 * Parts the bundle is cut into. The browser compiles each script file in a task of its own: one 1.6 MB file made
 * one task of about 50 ms on this machine under Lighthouse's trace (four times that on its simulated phone); eight
 * parts make tasks of about 5–20 ms.
 */
export const BUNDLE_PARTS = 8;
/**
 * Each page's one inline script: it loads the bundle's parts in order (`async = false`) once the snapshot is on the
 * screen (the first contentful paint), so the first paint never waits on 370 KB (brotli) of script sharing a slow
 * link with the page's HTML and fonts. Where nothing will paint before the app, it loads them at once: where the
 * snapshot is hidden (a wide or dark screen) and in a hidden page (a background tab). A browser that reports no
 * paint loads them after a second.
 */
export const BUNDLE_LOADER =
  `(function(){var started=0;function load(){if(started)return;started=1;` +
  `JSON.parse(document.getElementById('${BUNDLE_PARTS_ID}').textContent).forEach(function(src){` +
  `var s=document.createElement('script');s.src=src;s.async=false;document.head.appendChild(s)})}` +
  `if(document.hidden||matchMedia('${SNAPSHOT_HIDDEN_MEDIA}').matches)return load();setTimeout(load,1000);` +
  `try{new PerformanceObserver(function(list){if(list.getEntriesByName('first-contentful-paint').length)load()})` +
  `.observe({type:'paint',buffered:true})}catch(e){load()}})()`;
/** The content security policy's source for `BUNDLE_LOADER`, the only inline script it allows. */
export const BUNDLE_LOADER_CSP = `'sha256-${createHash('sha256').update(BUNDLE_LOADER).digest('base64')}'`;

/**
 * Cuts a Metro bundle's lines into `count` parts of about equal length, only ever before a module's registration
 * (`__d(`): Metro's runtime stays first and the lines that start the app (`__r(…)`) last, and a part can run
 * whenever the ones before it have.
 */
export function cutBundle(lines: readonly string[], count: number): string[] {
  const total = lines.reduce((sum, l) => sum + l.length + 1, 0);
  const parts: string[][] = [[]];
  let written = 0;
  for (const line of lines) {
    if (line.startsWith('__d(') && parts.length < count && written >= (total / count) * parts.length) parts.push([]);
    parts[parts.length - 1]!.push(line);
    written += line.length + 1;
  }
  return parts.map((p) => p.join('\n'));
}

/**
 * Replaces the export's entry bundle with `BUNDLE_PARTS` files (`index-<hash>-<n>.js`, so they stay immutable
 * under the bundle's hash), and each page's script tag with the parts' list and `BUNDLE_LOADER`. The bundle's
 * source map no longer matches, so it goes too.
 */
export function splitBundle(dir: string, count = BUNDLE_PARTS): void {
  const jsDir = path.join(dir, '_expo/static/js/web');
  for (const name of fs.readdirSync(jsDir).filter((f) => /^index-[0-9a-f]+\.js$/.test(f))) {
    const lines = fs.readFileSync(path.join(jsDir, name), 'utf8').split('\n').filter((l) => !l.startsWith('//# '));
    const urls = cutBundle(lines, count).map((text, i) => {
      const part = name.replace(/\.js$/, `-${i}.js`);
      fs.writeFileSync(path.join(jsDir, part), text);
      return `/_expo/static/js/web/${part}`;
    });
    fs.rmSync(path.join(jsDir, name));
    fs.rmSync(path.join(jsDir, `${name}.map`), { force: true });
    const tag = `<script src="/_expo/static/js/web/${name}" defer></script>`;
    const loader = `<script id="${BUNDLE_PARTS_ID}" type="application/json">${JSON.stringify(urls)}</script><script>${BUNDLE_LOADER}</script>`;
    let pages = 0;
    rewritePages(dir, (html) => (html.includes(tag) ? (pages++, html.replace(tag, loader)) : html));
    if (!pages) throw new Error(`No page of the export loads ${name}: Expo's script tag has changed.`);
  }
}

/** Every file under `dir`, as paths relative to it. */
export const filesUnder = (dir: string): string[] =>
  fs.readdirSync(dir, { recursive: true, withFileTypes: true }).filter((e) => e.isFile()).map((e) => path.relative(dir, path.join(e.parentPath, e.name)));

function rewritePages(dir: string, edit: (html: string) => string): void {
  for (const rel of filesUnder(dir).filter((f) => f.endsWith('.html'))) {
    const file = path.join(dir, rel);
    fs.writeFileSync(file, edit(fs.readFileSync(file, 'utf8')));
  }
}

/** Writes `<file>.br` and `<file>.gz` beside every text file of the export (served by express-static-gzip). */
export function precompress(dir: string): void {
  for (const rel of filesUnder(dir).filter((f) => COMPRESSIBLE.test(f))) {
    const file = path.join(dir, rel);
    const body = fs.readFileSync(file);
    fs.writeFileSync(`${file}.br`, zlib.brotliCompressSync(body, { params: { [zlib.constants.BROTLI_PARAM_QUALITY]: 11, [zlib.constants.BROTLI_PARAM_SIZE_HINT]: body.length } }));
    fs.writeFileSync(`${file}.gz`, zlib.gzipSync(body, { level: 9 }));
  }
}
