import { createHash } from 'node:crypto';
import fs from 'node:fs';
import path from 'node:path';
import { BUNDLE_PARTS_ID, SNAPSHOT_HIDDEN_MEDIA, WARM_ORDER_ID } from '../../src/web/page';
import { filesUnder } from '../web-pages';

// The build steps that rewrite Expo's and Metro's output. Each one leans on a private detail of that output (named
// beside it) and throws when it finds nothing to change, so an upgrade that changes the detail stops the build
// instead of shipping an app that quietly lost the step (DEVELOPERS.md, "Upgrading Expo, Metro or React").

/** Stops the build: the export no longer has the shape a step was written for. */
function changedShape(step: string, what: string): never {
  throw new Error(
    `Web build, ${step}: ${what}. Expo or Metro has changed its output; see DEVELOPERS.md, "Upgrading Expo, Metro or React" (WEB_PIPELINE=plain serves the plain export meanwhile).`,
  );
}

const pagesOf = (dir: string) => filesUnder(dir).filter((f) => f.endsWith('.html'));

/** Rewrites every page with `edit`; a page `edit` leaves unchanged stops the build. */
function rewritePages(dir: string, step: string, expected: string, edit: (html: string) => string): void {
  const pages = pagesOf(dir);
  if (!pages.length) changedShape(step, 'the export has no HTML pages');
  const unchanged: string[] = [];
  for (const rel of pages) {
    const file = path.join(dir, rel);
    const html = fs.readFileSync(file, 'utf8');
    const out = edit(html);
    if (out === html) unchanged.push(rel);
    else fs.writeFileSync(file, out);
  }
  if (unchanged.length) changedShape(step, `${unchanged.length} of ${pages.length} pages have no ${expected} (${unchanged.slice(0, 3).join(', ')})`);
}

/** Replaces `needle` once in `html`, or leaves `html` as it is when it is not there exactly once. */
const replaceOnce = (html: string, needle: string, by: string) => (html.split(needle).length === 2 ? html.replace(needle, by) : html);

// Private detail: Expo Router's static pages set this flag in an inline script so the app hydrates the page's HTML.
const HYDRATE_FLAG = '<script type="module">globalThis.__EXPO_ROUTER_HYDRATE__=true;</script>';
// Private detail: its head manager also writes an empty title ahead of the page's own (`app/+html.tsx`), which would win.
const EMPTY_TITLE = '<title data-rh="true"></title>';

/**
 * Takes the hydration flag out of every page, so the app renders afresh over the build-time snapshot instead of
 * hydrating it: the snapshot is rendered without a session and a screen width, which the app's first render has,
 * so the two differ by design (the role's navigation, the sidebar). The empty title goes too. Each page carries the
 * order in which `src/web/warm-up.ts` initialises the bundle's modules, as a JSON data block (never executed).
 */
export function renderOverSnapshots(dir: string): void {
  const order = `<script id="${WARM_ORDER_ID}" type="application/json">${JSON.stringify(warmOrder(dir))}</script>`;
  rewritePages(dir, 'hydration flag', `hydration flag ${HYDRATE_FLAG}`, (html) => replaceOnce(html, HYDRATE_FLAG, ''));
  rewritePages(dir, 'empty title', `empty title ${EMPTY_TITLE}`, (html) => replaceOnce(html, EMPTY_TITLE, ''));
  rewritePages(dir, 'warm-up order', 'one </head>', (html) => replaceOnce(html, '</head>', `${order}</head>`));
}

const bundleDir = (dir: string) => path.join(dir, '_expo/static/js/web');

// Private detail: Metro writes each module as `__d(function(...){...},<id>,<dependencies>);`, starting a line and
// ending one (a module may span lines); the dependencies are `[ids]`, or `{"0":id,...,"paths":{}}` in a module that
// uses `require.resolveWeak` (index.ts). The bundle then starts its entry modules with `__r(<id>);` lines.
const REGISTRATION_END = /\},(\d+),(\[[\d,]*\]|\{.*\})\);?$/gm;
const START = /^__r\((\d+)\);?$/gm;
// Private detail: Metro's runtime gives its require an `unguarded` twin (`src/web/warm-up.ts` calls it).
const UNGUARDED = /\.unguarded=function/;

/**
 * The export's modules with each one after the modules it imports (depth-first, dependencies first), from the
 * bundles' module registrations, without the modules the bundle starts itself (the entry, which calls the warm-up).
 */
export function warmOrder(dir: string): number[] {
  const js = bundleDir(dir);
  const files = fs.existsSync(js) ? fs.readdirSync(js).filter((n) => n.endsWith('.js')) : [];
  if (!files.length) changedShape('warm-up order', `no bundle in ${path.relative(dir, js) || js}`);
  const deps = new Map<number, number[]>();
  const started = new Set<number>();
  for (const f of files) {
    const text = fs.readFileSync(path.join(js, f), 'utf8');
    const registrations = [...text.matchAll(REGISTRATION_END)];
    const lines = text.match(/^__d\(/gm)?.length ?? 0;
    if (!registrations.length || registrations.length !== lines) {
      changedShape('warm-up order', `${f} has ${lines} module lines but ${registrations.length} registrations in Metro's format`);
    }
    if (!UNGUARDED.test(text)) changedShape('warm-up order', `${f} defines no \`__r.unguarded\``);
    for (const m of registrations) {
      const map: unknown = JSON.parse(m[2]!);
      const ids = Array.isArray(map)
        ? map
        : Object.entries(map as object)
            .filter(([k]) => /^\d+$/.test(k))
            .map(([, v]) => v);
      deps.set(
        Number(m[1]),
        ids.filter((d): d is number => Number.isInteger(d)),
      );
    }
    for (const m of text.matchAll(START)) started.add(Number(m[1]));
  }
  if (!started.size) changedShape('warm-up order', 'the bundle starts no module with `__r(id);`');
  const order: number[] = [];
  const seen = new Set<number>(started);
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
/** The content security policy's source for `BUNDLE_LOADER` (the server allows it by reading it from the pages). */
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

// Private detail: Expo's entry bundle is `index-<hash>.js`, loaded by every page with exactly this tag.
const ENTRY_BUNDLE = /^index-[0-9a-f]+\.js$/;
const scriptTag = (name: string) => `<script src="/_expo/static/js/web/${name}" defer></script>`;

/**
 * Replaces the export's entry bundle with `count` files (`index-<hash>-<n>.js`, so they stay immutable under the
 * bundle's hash), and each page's script tag with the parts' list and `BUNDLE_LOADER`. The bundle's source map no
 * longer matches, so it goes too.
 */
export function splitBundle(dir: string, count = BUNDLE_PARTS): void {
  const jsDir = bundleDir(dir);
  const entries = fs.existsSync(jsDir) ? fs.readdirSync(jsDir).filter((f) => ENTRY_BUNDLE.test(f)) : [];
  if (entries.length !== 1) changedShape('bundle parts', `expected one entry bundle index-<hash>.js, found ${entries.length}`);
  const name = entries[0]!;
  const lines = fs
    .readFileSync(path.join(jsDir, name), 'utf8')
    .split('\n')
    .filter((l) => !l.startsWith('//# '));
  const parts = cutBundle(lines, count);
  if (parts.length < Math.min(count, 2))
    changedShape('bundle parts', `${name} could be cut into ${parts.length} part(s) only: its modules no longer start lines with \`__d(\``);
  const urls = parts.map((text, i) => {
    const part = name.replace(/\.js$/, `-${i}.js`);
    fs.writeFileSync(path.join(jsDir, part), text);
    return `/_expo/static/js/web/${part}`;
  });
  fs.rmSync(path.join(jsDir, name));
  fs.rmSync(path.join(jsDir, `${name}.map`), { force: true });
  const loader = `<script id="${BUNDLE_PARTS_ID}" type="application/json">${JSON.stringify(urls)}</script><script>${BUNDLE_LOADER}</script>`;
  rewritePages(dir, 'bundle parts', `script tag ${scriptTag(name)}`, (html) => replaceOnce(html, scriptTag(name), loader));
}
