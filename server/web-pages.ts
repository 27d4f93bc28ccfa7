import { createHash } from 'node:crypto';
import fs from 'node:fs';
import path from 'node:path';

// Runtime: the API process reads the finished export with this module and `web-app.ts` only; the build steps that
// make the export live in `server/web-build/` and are never loaded by the server.

/**
 * The pages of a static export (`web.output: "static"`): Expo Router writes one HTML file per route, named like
 * its route file (`batches/[id].html`, `planner/index.html`), once without its `(group)` folders and once with
 * them. A request path is answered with the file of the route it matches, static segments before dynamic ones.
 */
export type PageRoute = { file: string; pattern: RegExp; dynamic: number; catchAll: boolean };

const escapeRe = (s: string) => s.replace(/[.*+?^${}()|[\]\\]/g, '\\$&');

/** The route a page file serves, e.g. `lots/enzymes/[id].html` → /^\/lots\/enzymes\/[^/]+\/?$/. */
export function routeOf(relFile: string): PageRoute {
  const segments = relFile
    .replace(/\.html$/, '')
    .split('/')
    .filter((s) => s !== 'index');
  let dynamic = 0;
  let catchAll = false;
  const body = segments
    .map((s) => {
      if (/^\[\.\.\..+\]$/.test(s)) {
        catchAll = true;
        dynamic += 1;
        return '(?:/[^?#]+)?';
      }
      if (/^\[.+\]$/.test(s)) {
        dynamic += 1;
        return '/[^/]+';
      }
      return `/${escapeRe(s)}`;
    })
    .join('');
  return { file: relFile, pattern: new RegExp(`^${body || '/'}${body ? '/?' : ''}$`), dynamic, catchAll };
}

/** Every file under `dir`, as paths relative to it. */
export const filesUnder = (dir: string): string[] =>
  fs
    .readdirSync(dir, { recursive: true, withFileTypes: true })
    .filter((e) => e.isFile())
    .map((e) => path.relative(dir, path.join(e.parentPath, e.name)));

/** Every routable page of the export, the most specific first. Group copies, the sitemap and +-files stay out. */
export function pageRoutes(root: string): PageRoute[] {
  return filesUnder(root)
    .map((f) => f.split(path.sep).join('/'))
    .filter((f) => f.endsWith('.html') && !f.split('/').some((seg) => /^[(_+]/.test(seg)))
    .map(routeOf)
    .sort((a, b) => Number(a.catchAll) - Number(b.catchAll) || a.dynamic - b.dynamic);
}

/** The file that answers `urlPath` and whether it is the export's not-found page. */
export function pageFor(routes: PageRoute[], root: string, urlPath: string): { file: string; notFound: boolean } | null {
  const hit = routes.find((r) => r.pattern.test(urlPath));
  if (hit) return { file: path.join(root, hit.file), notFound: false };
  const notFound = path.join(root, '+not-found.html');
  if (fs.existsSync(notFound)) return { file: notFound, notFound: true };
  return null;
}

// An inline script the browser runs: no src, and no type other than JavaScript (a JSON data block is never run).
const INLINE_SCRIPT = /<script(?![^>]*\ssrc=)(?![^>]*\stype="(?!module"|text\/javascript")[^"]*")[^>]*>([\s\S]*?)<\/script>/g;

/**
 * The content security policy's sources for the inline scripts of the export's pages, by their SHA-256: whatever the
 * build wrote (the bundle loader of `server/web-build/rewrite.ts`, or Expo's own scripts in the plain export) is
 * allowed, and nothing else.
 */
export function inlineScriptSources(root: string): string[] {
  const hashes = new Set<string>();
  for (const rel of filesUnder(root).filter((f) => f.endsWith('.html'))) {
    for (const m of fs.readFileSync(path.join(root, rel), 'utf8').matchAll(INLINE_SCRIPT)) {
      if (m[1]) hashes.add(`'sha256-${createHash('sha256').update(m[1]).digest('base64')}'`);
    }
  }
  return [...hashes].sort();
}
