import '@fontsource-variable/atkinson-hyperlegible-next';
import '@fontsource-variable/jetbrains-mono';
import './globals.css';
import type { Metadata, Viewport } from 'next';
import type { ReactNode } from 'react';
import { Providers } from '@/components/providers';

export const metadata: Metadata = {
  title: { default: 'Levelwire', template: '%s · Levelwire' },
  description: 'Live, recorded leveling of machining centres: the technician on site, the expert on the line.',
};

export const viewport: Viewport = { width: 'device-width', initialScale: 1, themeColor: '#0f5d4e' };

export default function RootLayout({ children }: { children: ReactNode }) {
  return (
    <html lang="en">
      <body className="min-h-dvh antialiased">
        <Providers>{children}</Providers>
      </body>
    </html>
  );
}
