import { LoginForm } from '@/components/LoginForm';

export const dynamic = 'force-dynamic';

/** Only same-site paths are followed after signing in. */
function safeNext(next: string | string[] | undefined): string {
  const n = Array.isArray(next) ? next[0] : next;
  return n && n.startsWith('/') && !n.startsWith('//') && !n.startsWith('/login') ? n : '/';
}

export default async function LoginPage({ searchParams }: { searchParams: Promise<Record<string, string | string[] | undefined>> }) {
  const next = safeNext((await searchParams).next);
  return (
    <>
      <h1>Sign in</h1>
      <p className="muted">Use the account an admin made for you. A new installation prints how to add the first one.</p>
      <LoginForm next={next} />
    </>
  );
}
