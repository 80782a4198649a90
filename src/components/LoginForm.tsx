'use client';
/** E-mail and password; large targets for a tablet; the server's message shown beside the field it names. */
import { useState } from 'react';
import { postJson } from './api-client';

export function LoginForm({ next }: { next: string }) {
  const [email, setEmail] = useState('');
  const [password, setPassword] = useState('');
  const [error, setError] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);

  const submit = async (e: React.FormEvent) => {
    e.preventDefault();
    setBusy(true);
    setError(null);
    const r = await postJson<{ user: { email: string } }>('/api/auth/login', { email, password });
    if (r.ok) {
      window.location.assign(next);
      return;
    }
    setBusy(false);
    setError(r.error.message);
  };

  return (
    <form className="panel login" onSubmit={submit} noValidate>
      <label>
        E-mail
        <input type="email" name="email" autoComplete="username" value={email} onChange={(e) => setEmail(e.target.value)} required autoFocus />
      </label>
      <label>
        Password
        <input type="password" name="password" autoComplete="current-password" value={password} onChange={(e) => setPassword(e.target.value)} required />
      </label>
      {error ? (
        <p className="error" role="alert" data-testid="login-error">
          {error}
        </p>
      ) : null}
      <button type="submit" className="btn" disabled={busy} data-testid="sign-in">
        {busy ? 'Signing in…' : 'Sign in'}
      </button>
    </form>
  );
}
