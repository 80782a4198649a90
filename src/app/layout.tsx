import type { Metadata, Viewport } from 'next';
import Link from 'next/link';
import './globals.css';

export const metadata: Metadata = {
  title: 'Saltus — hopping-robot test campaigns',
  description: 'Plan, schedule, log and analyse test campaigns for small hopping and legged robots.',
};

export const viewport: Viewport = { width: 'device-width', initialScale: 1 };

export default function RootLayout({ children }: { children: React.ReactNode }) {
  return (
    <html lang="en">
      <body>
        <header className="top">
          <Link href="/" className="brand">
            Saltus
          </Link>
          <Link href="/">Campaigns</Link>
          <Link href="/campaigns/new">New campaign</Link>
        </header>
        <main>{children}</main>
      </body>
    </html>
  );
}
