import type { Metadata, Viewport } from 'next';
import { headers } from 'next/headers';
import Link from 'next/link';
import { redirect } from 'next/navigation';
import { AuthBar } from '@/components/AuthBar';
import { RoleProvider } from '@/components/role-context';
import { pagePrincipal } from '@/server/auth/page-session';
import { may } from '@/server/auth/roles';
import './globals.css';

export const metadata: Metadata = {
  title: 'Saltus — hopping-robot test campaigns',
  description: 'Plan, schedule, log and analyse test campaigns for small hopping and legged robots.',
};

export const viewport: Viewport = { width: 'device-width', initialScale: 1 };

export default async function RootLayout({ children }: { children: React.ReactNode }) {
  // Every page but /login needs a valid session (src/proxy.ts sends cookie-less requests away first).
  const path = (await headers()).get('x-saltus-path') ?? '/';
  const onLogin = path === '/login' || path.startsWith('/login?');
  const who = await pagePrincipal();
  if (!who && !onLogin) redirect(path === '/' ? '/login' : `/login?next=${encodeURIComponent(path)}`);
  return (
    <html lang="en">
      <body>
        <header className="top">
          <Link href="/" className="brand">
            Saltus
          </Link>
          {who ? (
            <>
              <Link href="/">Campaigns</Link>
              {may(who.role, 'createCampaign') ? <Link href="/campaigns/new">New campaign</Link> : null}
              {may(who.role, 'administer') ? <Link href="/accounts">Accounts</Link> : null}
              <AuthBar name={who.name} email={who.actor} role={who.role} />
            </>
          ) : null}
        </header>
        <main>
          <RoleProvider role={who?.role ?? null}>{children}</RoleProvider>
        </main>
      </body>
    </html>
  );
}
