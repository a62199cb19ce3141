import React from 'react';
import { ScrollViewStyleReset } from 'expo-router/html';

// Static HTML frame for every exported route: paper background from the first paint, so
// the page does not flash white before the bundle runs.
export default function Root({ children }: { children: React.ReactNode }) {
  return (
    <html lang="en">
      <head>
        <meta charSet="utf-8" />
        <meta httpEquiv="X-UA-Compatible" content="IE=edge" />
        <meta name="viewport" content="width=device-width, initial-scale=1, shrink-to-fit=no" />
        <meta name="theme-color" content="#F3F0E8" />
        <meta name="description" content="Fluxwright: calibration and drive planning for flux-tunable superconducting resonators." />
        <ScrollViewStyleReset />
        <style dangerouslySetInnerHTML={{ __html: 'html,body{background:#F3F0E8;color:#1B2430;} body{overflow-x:hidden;}' }} />
      </head>
      <body>{children}</body>
    </html>
  );
}
