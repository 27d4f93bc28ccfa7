import fs from 'node:fs';
import path from 'node:path';
import { filesUnder } from './web-build';

/**
 * The pages of a static export (`web.output: "static"`): Expo Router writes one HTML file per route, named like
 * its route file (`batches/[id].html`, `planner/index.html`), once without its `(group)` folders and once with
 * them. A request path is answered with the file of the route it matches, static segments before dynamic ones.
 */
export type PageRoute = { file: string; pattern: RegExp; dynamic: number; catchAll: boolean };

const escapeRe = (s: string) => s.replace(/[.*+?^${}()|[\]\\]/g, '\\$&');

/** The route a page file serves, e.g. `lots/enzymes/[id].html` → /^\/lots\/enzymes\/[^/]+\/?$/. */
export function routeOf(relFile: string): PageRoute {
  const segments = relFile.replace(/\.html$/, '').split('/').filter((s) => s !== 'index');
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
