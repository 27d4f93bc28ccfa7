import { ScrollViewStyleReset } from 'expo-router/html';
import type { PropsWithChildren } from 'react';
import { light } from '@/theme/colors';
import { SNAPSHOT_CSS } from '@/web/page';

/** The HTML around every page Expo Router renders at build time (never part of the app's bundle). */
export default function Root({ children }: PropsWithChildren) {
  return (
    <html lang="en">
      <head>
        <meta charSet="utf-8" />
        <meta httpEquiv="X-UA-Compatible" content="IE=edge" />
        <meta name="viewport" content="width=device-width, initial-scale=1, shrink-to-fit=no" />
        <meta name="theme-color" content={light.primary} />
        {/* Installable: the manifest and icons are written by the build (server/web-build/offline.ts). */}
        <link rel="manifest" href="/manifest.webmanifest" />
        <link rel="apple-touch-icon" href="/icons/icon-192.png" />
        <title>Yieldpoint</title>
        <ScrollViewStyleReset />
        <style dangerouslySetInnerHTML={{ __html: SNAPSHOT_CSS }} />
      </head>
      <body data-snapshot="" inert>
        <noscript>
          <div style={{ padding: 12, font: '16px system-ui, sans-serif', background: light.warning, color: light.onPrimary }}>
            Yieldpoint needs JavaScript. Turn it on in this browser&apos;s settings.
          </div>
        </noscript>
        {children}
      </body>
    </html>
  );
}
