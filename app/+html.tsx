/**
 * The web page shell (used when the web build renders HTML ahead of time): language, theme colour
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
        <ScrollViewStyleReset />
        <style dangerouslySetInnerHTML={{ __html: 'body { background-color: #F4F7F9; }' }} />
      </head>
      <body>{children}</body>
    </html>
  );
}
