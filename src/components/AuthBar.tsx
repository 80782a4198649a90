'use client';
/** Who is signed in, with which role, and the sign-out button (header). */
import { useState } from 'react';
import { postJson } from './api-client';

export function AuthBar({ name, email, role }: { name: string; email: string; role: string }) {
  const [busy, setBusy] = useState(false);
  const signOut = async () => {
    setBusy(true);
    await postJson('/api/auth/logout', {});
    // a full load, so the root layout checks the (now ended) session again
    // eslint-disable-next-line @next/next/no-location-assign-relative-destination
    window.location.assign('/login');
  };
  return (
    <span className="authbar" data-testid="auth-bar">
      <span title={email}>
        {name} <span className="badge" data-testid="auth-role">{role}</span>
      </span>
      <button type="button" className="btn secondary" onClick={signOut} disabled={busy} data-testid="sign-out">
        Sign out
      </button>
    </span>
  );
}
