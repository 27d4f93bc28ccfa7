import { WIDE_MIN_WIDTH } from '../theme/tokens';

// What the build writes into every page and the browser reads back. No React here: the build and the API server
// import these names without loading the app's code (`tests/server/web-runtime.test.ts` checks it).

/** The id of each page's JSON list of the bundle's parts, which the bundle loader loads (server/web-build). */
export const BUNDLE_PARTS_ID = 'yieldpoint-bundle-parts';

/** The id of each page's JSON list of module numbers that `src/web/warm-up.ts` initialises, in that order. */
export const WARM_ORDER_ID = 'yieldpoint-warm-order';

/**
 * Where the build-time snapshot is hidden until the app has rendered over it, because it would not match: on a wide
 * screen (the snapshot has the phone layout) and in the dark scheme (the snapshot is light).
 */
export const SNAPSHOT_HIDDEN_MEDIA = `(min-width: ${WIDE_MIN_WIDTH}px), (prefers-color-scheme: dark)`;
export const SNAPSHOT_CSS = `@media ${SNAPSHOT_HIDDEN_MEDIA} { body[data-snapshot] #root { visibility: hidden; } }`;
