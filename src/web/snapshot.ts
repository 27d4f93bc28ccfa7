import { useLayoutEffect } from 'react';
import { WIDE_MIN_WIDTH } from '../theme/tokens';

/**
 * True while Expo Router renders a page's HTML at build time: there is no window, no session and no screen width,
 * so the signed-in frame is drawn without the role's navigation. The app renders afresh over that snapshot
 * (`renderOverSnapshots` in the build): a phone shows the page's frame and headings from the HTML alone, before the
 * JavaScript has arrived.
 */
export const isBuildSnapshot = typeof window === 'undefined';

/**
 * Until the app has rendered, the snapshot is inert (a tap or a typed letter would be lost when the app replaces
 * it), and hidden where it would not match: on a wide screen (the snapshot has the phone layout) and in the dark
 * scheme (the snapshot is light).
 */
export const SNAPSHOT_HIDDEN_MEDIA = `(min-width: ${WIDE_MIN_WIDTH}px), (prefers-color-scheme: dark)`;
export const SNAPSHOT_CSS = `@media ${SNAPSHOT_HIDDEN_MEDIA} { body[data-snapshot] #root { visibility: hidden; } }`;

/** Called once by the root layout: its first commit has replaced the snapshot. */
export function useSnapshotReplaced(): void {
  useLayoutEffect(() => {
    document.body.removeAttribute('inert');
    document.body.removeAttribute('data-snapshot');
  }, []);
}
