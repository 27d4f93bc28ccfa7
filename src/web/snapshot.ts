import { useLayoutEffect } from 'react';

/**
 * True while Expo Router renders a page's HTML at build time: there is no window, no session and no screen width,
 * so the signed-in frame is drawn without the role's navigation. The app renders afresh over that snapshot
 * (`renderOverSnapshots` in `server/web-build/rewrite.ts`): a phone shows the page's frame and headings from the
 * HTML alone, before the JavaScript has arrived.
 */
export const isBuildSnapshot = typeof window === 'undefined';

/**
 * Called once by the root layout: its first commit has replaced the snapshot. Until then the snapshot is inert (a tap
 * or a typed letter would be lost when the app replaces it), and hidden where it would not match (`SNAPSHOT_CSS` in
 * `src/web/page.ts`).
 */
export function useSnapshotReplaced(): void {
  useLayoutEffect(() => {
    document.body.removeAttribute('inert');
    document.body.removeAttribute('data-snapshot');
  }, []);
}
