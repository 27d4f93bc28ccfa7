import fs from 'node:fs';
import path from 'node:path';
import { generateSW, type RuntimeCaching } from 'workbox-build';
import { light } from '../../src/theme/colors';
import { CACHED_AT_HEADER, SERVICE_WORKER_URL, USER_CACHES } from '../../src/web/offline';
import { filesUnder, pageRoutes } from '../web-pages';

// Build-time only: the installable app's manifest and icons, and the service worker Workbox generates over the
// finished export (after the bundle is cut into its parts, before everything is compressed).

const [API_CACHE, PAGES_CACHE] = USER_CACHES;
/** How long a read waits on the network before the cached answer is shown instead, s. */
export const NETWORK_TIMEOUT_S = 3;
const MANIFEST_FILE = 'manifest.webmanifest';
const ICONS = ['icon-192.png', 'icon-512.png', 'icon-maskable-512.png'];

/** The web app manifest: name, the favicon's design as icons, the theme's colours. */
export function webManifest() {
  return {
    name: 'Yieldpoint',
    short_name: 'Yieldpoint',
    description: 'Enzyme batch temperatures: plan, approve, log at the vessel.',
    start_url: '/',
    scope: '/',
    display: 'standalone',
    background_color: light.background,
    theme_color: light.primary,
    icons: [
      { src: '/icons/icon-192.png', sizes: '192x192', type: 'image/png', purpose: 'any' },
      { src: '/icons/icon-512.png', sizes: '512x512', type: 'image/png', purpose: 'any' },
      { src: '/icons/icon-maskable-512.png', sizes: '512x512', type: 'image/png', purpose: 'maskable' },
    ],
  };
}

/**
 * A Workbox plugin callback, kept as source text: workbox-build writes plugin functions into the service worker
 * by their `toString()`, and a function compiled by tsx would carry its `__name` helper along (DEVELOPERS.md).
 * It marks an answer taken from the cache with the time the server gave it, so the screen can say how old it is.
 */
const MARK_CACHED_ANSWER = `async ({ cachedResponse }) => {
  if (!cachedResponse) return cachedResponse;
  const headers = new Headers(cachedResponse.headers);
  headers.set(${JSON.stringify(CACHED_AT_HEADER)}, cachedResponse.headers.get('date') || '');
  return new Response(await cachedResponse.blob(), { status: cachedResponse.status, statusText: cachedResponse.statusText, headers });
}`;
const markCachedAnswer = new Function(`return ${MARK_CACHED_ANSWER}`)() as () => Promise<Response | undefined>;

/** Where the build's own file of a page is precached (see `manifestTransforms` below). */
const shellURL = (file: string) => `${file}?shell`;

/** A page route's path pattern as Workbox matches it: against the whole URL, query string allowed. */
const hrefPattern = (pathPattern: RegExp) => new RegExp(`^https?://[^/]+${pathPattern.source.replace(/^\^/, '').replace(/\$$/, '')}(?:\\?.*)?$`);

/**
 * The service worker's routes, in order:
 * - API reads (GET only: writes always go to the network, never to a cache) network-first: the server's answer
 *   when it comes within NETWORK_TIMEOUT_S, else the last good one, marked with its time.
 * - Each page route network-first too: the page as the server last served it to this user (with the session
 *   written in), else the build's own file for that route, so a route never opened before still opens offline.
 */
export function runtimeCaching(dir: string): RuntimeCaching[] {
  const pages = pageRoutes(dir);
  // Expo Router's page files are what the routes below are made from: none found is a changed export, not an app
  // without pages.
  if (!pages.length)
    throw new Error(
      `Web build, service worker: no page routes in ${dir}; Expo Router's static pages have changed (DEVELOPERS.md, "Upgrading Expo, Metro or React").`,
    );
  return [
    {
      urlPattern: /^https?:\/\/[^/]+\/api\//,
      handler: 'NetworkFirst',
      method: 'GET',
      options: {
        cacheName: API_CACHE,
        networkTimeoutSeconds: NETWORK_TIMEOUT_S,
        cacheableResponse: { statuses: [200] },
        plugins: [{ cachedResponseWillBeUsed: markCachedAnswer }],
      },
    },
    ...pages.map((r): RuntimeCaching => ({
      urlPattern: hrefPattern(r.pattern),
      handler: 'NetworkFirst',
      method: 'GET',
      // Status 0 keeps `/`'s redirect to the role's home (an opaque redirect) for an offline start.
      options: {
        cacheName: PAGES_CACHE,
        networkTimeoutSeconds: NETWORK_TIMEOUT_S,
        cacheableResponse: { statuses: [0, 200] },
        precacheFallback: { fallbackURL: `/${shellURL(r.file)}` },
      },
    })),
  ];
}

/** Writes the manifest and its icons into the export and generates the service worker over it. */
export async function writeOffline(root: string, dir: string): Promise<{ precached: number; bytes: number }> {
  fs.writeFileSync(path.join(dir, MANIFEST_FILE), JSON.stringify(webManifest(), null, 2));
  fs.mkdirSync(path.join(dir, 'icons'), { recursive: true });
  for (const icon of ICONS) fs.copyFileSync(path.join(root, 'assets/icons', icon), path.join(dir, 'icons', icon));
  const precached = new Set<string>();
  const { count, size, warnings } = await generateSW({
    globDirectory: dir,
    // The bundle's parts, fonts, icons and every route's page as the build wrote it; the compressed copies are
    // the server's business, and the `(group)` copies of pages are never asked for.
    globPatterns: ['**/*.{js,css,html,woff2,png,ico,svg,webmanifest}'],
    globIgnores: ['**/*.{br,gz}', '**/(*)/**', 'assets/node_modules/**', path.basename(SERVICE_WORKER_URL)],
    // Files under a content hash need no revision of their own.
    dontCacheBustURLsMatching: /^_expo\/|^assets\//,
    maximumFileSizeToCacheInBytes: 4 * 1024 * 1024,
    swDest: path.join(dir, path.basename(SERVICE_WORKER_URL)),
    // Page requests go to the network first (the routes above): the precache must not answer `/` or `/planner/`
    // with a build file before the server has had its say (its redirect, the session it writes in).
    // Workbox's precache also answers `/sign-in` with `sign-in.html` (its clean-URL rule, always on), so the pages
    // are precached under a query no request carries, and reached only as the fallbacks of their routes.
    directoryIndex: null,
    manifestTransforms: [
      async (entries) => {
        for (const e of entries) precached.add(e.url);
        return { manifest: entries.map((e) => (e.url.endsWith('.html') ? { ...e, url: shellURL(e.url) } : e)), warnings: [] };
      },
    ],
    runtimeCaching: runtimeCaching(dir),
    // A new build (new bundle hash, new precache list) takes over at once and drops the old precache.
    skipWaiting: true,
    clientsClaim: true,
    cleanupOutdatedCaches: true,
    inlineWorkboxRuntime: true,
    sourcemap: false,
    mode: 'production',
    disableDevLogs: true,
  });
  if (warnings.length) throw new Error(`Workbox: ${warnings.join('; ')}`);
  // Offline start needs every script the pages load; a bundle left out (too big, a new folder) would fail only offline.
  const scripts = filesUnder(dir).filter((f) => f.endsWith('.js') && f.startsWith('_expo'));
  const missing = scripts.filter((f) => !precached.has(f.split(path.sep).join('/')));
  if (!scripts.length || missing.length)
    throw new Error(`Web build, service worker: ${scripts.length ? `not precached: ${missing.join(', ')}` : 'no bundle to precache'}.`);
  return { precached: count, bytes: size };
}
