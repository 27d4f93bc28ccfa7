import cookieParser from 'cookie-parser';
import type { Express } from 'express';
import expressStaticGzip from 'express-static-gzip';
import fs from 'node:fs';
import type { IncomingMessage } from 'node:http';
import path from 'node:path';
import { HOME } from '../src/components/shell/navigation';
import { PAGE_SESSION_ID } from '../src/contracts/rules';
import { SessionState } from '../src/contracts/session';
import { authenticate } from './middleware/auth';
import type { AuthContext } from './services/auth';
import { inlineScriptSources, pageFor, pageRoutes, type PageRoute } from './web-pages';

/**
 * The page with the session it is served for, as a JSON data block (never executed, so the content security
 * policy need not allow it): the app renders the signed-in shell without first asking /api/session,
 * one round trip less on a slow plant network. `<` is escaped so no name can close the block.
 */
export function pageWithSession(html: string, state: SessionState): string {
  const json = JSON.stringify(SessionState.parse(state)).replace(/</g, '\\u003c');
  return html.replace('</head>', `<script id="${PAGE_SESSION_ID}" type="application/json">${json}</script></head>`);
}

/** The finished export as the server reads it (made by `server/web-build/build.ts`, never by the server). */
export type WebExport = {
  root: string;
  /** The export's page routes and its inline scripts' policy sources, read again when it has been rebuilt. */
  current(): { routes: PageRoute[]; scriptSources: string };
  /** The content security policy's `script-src` entry for the export's own inline scripts (helmet calls it). */
  scriptSources(req: IncomingMessage): string;
};

export function openWebExport(webDir: string): WebExport {
  const root = path.resolve(webDir);
  const indexHtml = path.join(root, 'index.html');
  // The export is read again whenever it is rebuilt (index.html is written anew), without a restart.
  let loaded = { builtAt: -1, routes: [] as PageRoute[], scriptSources: '' };
  const current = () => {
    const builtAt = fs.existsSync(indexHtml) ? fs.statSync(indexHtml).mtimeMs : 0;
    if (loaded.builtAt !== builtAt) {
      loaded = builtAt ? { builtAt, routes: pageRoutes(root), scriptSources: inlineScriptSources(root).join(' ') } : { builtAt, routes: [], scriptSources: '' };
    }
    return loaded;
  };
  current();
  // An API answer runs no script: it keeps the sources last read instead of looking at the export's files.
  return { root, current, scriptSources: (req) => (req.url?.startsWith('/api/') ? loaded : current()).scriptSources };
}

/**
 * Serves the exported app: hashed bundles cached for a year (brotli or gzip from the files the build compressed
 * beforehand), and for every other GET the page of the route it names, rendered at build time, with the session
 * written in; never cached, since it names the signed-in user. A path no route matches gets the not-found page.
 */
export function serveWeb(app: Express, web: WebExport, auth: AuthContext): void {
  const { root } = web;
  const indexHtml = path.join(root, 'index.html');
  app.use(
    expressStaticGzip(root, {
      enableBrotli: true,
      orderPreference: ['br', 'gz'],
      index: false,
      serveStatic: {
        index: false,
        // `/planner` is a page, not a request to be redirected to the folder `/planner/`.
        redirect: false,
        setHeaders: (res, file) => {
          const hashed = file.includes(`${path.sep}_expo${path.sep}`) || file.includes(`${path.sep}assets${path.sep}`);
          res.setHeader('cache-control', hashed ? 'public, max-age=31536000, immutable' : 'no-cache');
        },
      },
    }),
  );
  // `/` is only a way in: the server sends each role to its home, and anyone else to the sign-in page, at once.
  app.get('/', cookieParser(), authenticate(auth), (req, res) => {
    res.setHeader('cache-control', 'no-store');
    res.vary('cookie');
    res.redirect(302, req.user ? HOME[req.user.role] : '/sign-in');
  });
  app.get('/{*splat}', cookieParser(), authenticate(auth), (req, res, next) => {
    if (!fs.existsSync(indexHtml)) return next();
    const page = pageFor(web.current().routes, root, req.path) ?? { file: indexHtml, notFound: false };
    res.setHeader('cache-control', 'no-store');
    res.vary('cookie');
    res.status(page.notFound ? 404 : 200);
    res.type('html').send(pageWithSession(fs.readFileSync(page.file, 'utf8'), { user: req.user ?? null }));
  });
}
