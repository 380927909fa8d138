import '@fontsource-variable/atkinson-hyperlegible-next';
import '@fontsource-variable/jetbrains-mono';
import './globals.css';
import type { Metadata, Viewport } from 'next';
import { connection } from 'next/server';
import type { ReactNode } from 'react';
import { Providers } from '@/components/providers';

export const metadata: Metadata = {
  title: { default: 'Levelwire', template: '%s · Levelwire' },
  description: 'Live, recorded leveling of machining centres: the technician on site, the expert on the line.',
};

export const viewport: Viewport = { width: 'device-width', initialScale: 1, themeColor: '#0f5d4e' };

export default async function RootLayout({ children }: { children: ReactNode }) {
  // Every page renders per request, so its scripts carry that request's CSP nonce (proxy.ts); a page prerendered at
  // build time would hold scripts without one, which the policy blocks.
  await connection();
  return (
    <html lang="en">
      <body className="min-h-dvh antialiased">
        <Providers>{children}</Providers>
      </body>
    </html>
  );
}
