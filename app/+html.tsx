/**
 * The web page shell for a static export (web.output "static"). Today's build is a single-page
 * export, whose shell is public/index.html: keep the two alike (manifest, icons, viewport).
 * Language, theme colour
 * for the browser chrome, and a viewport that lets people zoom (never block pinch-zoom: it is how
 * many people with low vision read).
 */
import { ScrollViewStyleReset } from 'expo-router/html';
import type { PropsWithChildren } from 'react';

export default function Root({ children }: PropsWithChildren) {
  return (
    <html lang="en">
      <head>
        <meta charSet="utf-8" />
        <meta httpEquiv="X-UA-Compatible" content="IE=edge" />
        <meta name="viewport" content="width=device-width, initial-scale=1, viewport-fit=cover" />
        <meta name="theme-color" content="#0E3B52" />
        <meta name="description" content="Boardside: the coach's notebook at the rink boards." />
        <link rel="manifest" href="/manifest.webmanifest" />
        <link rel="icon" href="/favicon.ico" sizes="32x32" />
        <link rel="icon" href="/icons/icon.svg" type="image/svg+xml" />
        <link rel="apple-touch-icon" href="/icons/apple-touch-icon.png" />
        <ScrollViewStyleReset />
        <style dangerouslySetInnerHTML={{ __html: 'body { background-color: #F4F7F9; }' }} />
      </head>
      <body>{children}</body>
    </html>
  );
}
