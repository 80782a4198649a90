'use client';
/**
 * The accounts page for administrators: people (list, add, disable with a confirm step) and API tokens
 * (list, create with the secret shown once, revoke with a confirm step). Every change goes through the
 * JSON API (with the CSRF header, see api-client.ts); the server's message is shown beside the field it names.
 */
import { useState } from 'react';
import type { TokenView, UserView } from '@/server/auth/accounts';
import { ROLES, type Role } from '@/server/auth/roles';
import { callApi, postJson, type ApiError } from './api-client';
import { ErrorBox } from './FieldError';

/** A stored instant as `YYYY-MM-DD HH:MM` in UTC: the same text on the server and in the browser. */
export function when(iso: string | null): string {
  return iso ? iso.slice(0, 16).replace('T', ' ') : '—';
}

/** Date cells may break between day and time, so the tables fit a tablet held upright. */
const dateCell: React.CSSProperties = { whiteSpace: 'normal', minWidth: '6.5em' };

/** The confirm step of a change that cannot be undone from the page, shown below its table. */
function Confirm({ question, yes, busy, onYes, onNo }: { question: string; yes: string; busy: boolean; onYes: () => void; onNo: () => void }) {
  return (
    <div className="warning" role="alertdialog" aria-label={question}>
      <p style={{ marginTop: 0 }}>{question}</p>
      <div className="row">
        <button type="button" className="btn danger" disabled={busy} onClick={onYes}>
          {yes}
        </button>
        <button type="button" className="btn secondary" disabled={busy} onClick={onNo}>
          Cancel
        </button>
      </div>
    </div>
  );
}

/** The error box beside the field the error names; `fields` have their own box, any other error shows below the form. */
function useFieldErrors(fields: readonly string[]) {
  const [error, setError] = useState<ApiError | null>(null);
  const at = (field: string) => (error?.field === field ? <ErrorBox error={error} /> : null);
  const elsewhere = error && !fields.includes(error.field ?? '') ? <ErrorBox error={error} /> : null;
  const bad = (field: string) => (error?.field === field ? true : undefined);
  return { error, setError, at, elsewhere, bad };
}

function RoleSelect({ id, value, onChange, invalid }: { id: string; value: Role; onChange: (r: Role) => void; invalid?: boolean }) {
  return (
    <select id={id} name="role" value={value} onChange={(e) => onChange(e.target.value as Role)} aria-invalid={invalid}>
      {ROLES.map((r) => (
        <option key={r} value={r}>
          {r}
        </option>
      ))}
    </select>
  );
}

/**
 * A listed kind (people, tokens): the rows, reloaded from `listPath` after a change, and one change at a
 * time behind a confirm step (`confirming` holds the row's key), answered by a notice or an error.
 */
function useAdminList<T>(initial: T[], listPath: string, rowsOf: (data: Record<string, T[]>) => T[]) {
  const [rows, setRows] = useState(initial);
  const [confirming, setConfirming] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);
  const [listError, setListError] = useState<ApiError | null>(null);
  const [notice, setNotice] = useState<string | null>(null);

  const reload = async () => {
    const r = await callApi<Record<string, T[]>>(listPath, 'GET');
    if (r.ok) setRows(rowsOf(r.data));
    else setListError(r.error);
  };

  /** POST the change, then say what it did (or show the refusal) and reload the rows. */
  const change = async <A,>(path: string, body: unknown, said: (answer: A) => string) => {
    setBusy(true);
    setListError(null);
    setNotice(null);
    const r = await postJson<A>(path, body);
    setBusy(false);
    setConfirming(null);
    if (!r.ok) return setListError(r.error);
    setNotice(said(r.data));
    await reload();
  };

  return { rows, confirming, setConfirming, busy, listError, notice, setNotice, reload, change };
}

/** A row's last cell: when it was ended (disabled, revoked), or the button that asks to end it ("—" when `locked`). */
function EndCell({ endedAt, action, rowKey, confirming, onAsk, locked = false }: { endedAt: string | null; action: string; rowKey: string; confirming: string | null; onAsk: (key: string) => void; locked?: boolean }) {
  return (
    <td style={dateCell}>
      {endedAt ? (
        when(endedAt)
      ) : locked ? (
        '—'
      ) : (
        <button type="button" className="btn secondary" disabled={confirming === rowKey} onClick={() => onAsk(rowKey)} aria-label={`${action} ${rowKey}`}>
          {action}
        </button>
      )}
    </td>
  );
}

type ListStatus = { busy: boolean; listError: ApiError | null; notice: string | null; setConfirming: (key: string | null) => void };

/** Below a list: the confirm step of the pending change, then its refusal or notice. */
function ListFooter({ question, yes, list, onYes }: { question: string | null; yes: string; list: ListStatus; onYes: () => void }) {
  return (
    <>
      {question ? <Confirm question={question} yes={yes} busy={list.busy} onYes={onYes} onNo={() => list.setConfirming(null)} /> : null}
      <ErrorBox error={list.listError} />
      {list.notice ? (
        <p className="ok" role="status">
          {list.notice}
        </p>
      ) : null}
    </>
  );
}

// ---------------------------------------------------------------------------------------------------
// People

export function PeoplePanel({ initial, me }: { initial: UserView[]; me: string }) {
  const list = useAdminList<UserView>(initial, '/api/v1/users', (d) => d.users!);
  const { rows: users, confirming, setConfirming } = list;
  const disable = (email: string) =>
    list.change<UserView>('/api/v1/users/disable', { email }, (u) => `${u.email} is disabled: signed out everywhere, their tokens stop working; the account and its history stay.`);

  return (
    <section className="panel" data-testid="people">
      <h2 style={{ marginTop: 0 }}>People</h2>
      <div className="table-wrap">
        <table className="data" data-testid="people-table">
          <thead>
            <tr>
              <th>E-mail</th>
              <th>Name</th>
              <th>Role</th>
              <th>Created (UTC)</th>
              <th>Disabled</th>
            </tr>
          </thead>
          <tbody>
            {users.map((u) => (
              <tr key={u.id} data-testid="person-row">
                <td>
                  {u.email}
                  {u.email === me ? <span className="badge">you</span> : null}
                </td>
                <td>{u.name}</td>
                <td>{u.role}</td>
                <td style={dateCell}>{when(u.createdAt)}</td>
                <EndCell endedAt={u.disabledAt} action="Disable" rowKey={u.email} confirming={confirming} onAsk={setConfirming} locked={u.email === me} />
              </tr>
            ))}
          </tbody>
        </table>
      </div>
      {users.length === 0 ? <p className="muted">No accounts yet.</p> : null}
      <ListFooter
        list={list}
        question={confirming ? `Disable ${confirming}? They are signed out everywhere and their tokens stop working; the account and its history stay.` : null}
        yes="Yes, disable"
        onYes={() => confirming && disable(confirming)}
      />
      <AddPersonForm
        onAdded={async (u) => {
          list.setNotice(`${u.email} can now sign in with the role ${u.role}.`);
          await list.reload();
        }}
      />
    </section>
  );
}

const PERSON_FIELDS = ['email', 'name', 'role', 'password'] as const;

function AddPersonForm({ onAdded }: { onAdded: (u: UserView) => void | Promise<void> }) {
  const [email, setEmail] = useState('');
  const [name, setName] = useState('');
  const [role, setRole] = useState<Role>('viewer');
  const [password, setPassword] = useState('');
  const [busy, setBusy] = useState(false);
  const { setError, at, elsewhere, bad } = useFieldErrors(PERSON_FIELDS);

  const submit = async (e: React.FormEvent) => {
    e.preventDefault();
    setError(null);
    setBusy(true);
    const r = await postJson<UserView>('/api/v1/users', { email, name, role, password });
    setBusy(false);
    if (!r.ok) return setError(r.error);
    setEmail('');
    setName('');
    setPassword('');
    setRole('viewer');
    await onAdded(r.data);
  };

  return (
    <form onSubmit={submit} noValidate data-testid="add-person">
      <h3>Add a person</h3>
      <div className="row">
        <div>
          <label htmlFor="p-email">E-mail</label>
          <input id="p-email" name="email" type="email" autoComplete="off" value={email} onChange={(e) => setEmail(e.target.value)} aria-invalid={bad('email')} />
          {at('email')}
        </div>
        <div>
          <label htmlFor="p-name">Name</label>
          <input id="p-name" name="name" autoComplete="off" value={name} onChange={(e) => setName(e.target.value)} aria-invalid={bad('name')} />
          {at('name')}
        </div>
        <div className="narrow">
          <label htmlFor="p-role">Role</label>
          <RoleSelect id="p-role" value={role} onChange={setRole} invalid={bad('role')} />
          {at('role')}
        </div>
        <div>
          <label htmlFor="p-password">Password (at least 12 characters)</label>
          <input id="p-password" name="password" type="password" autoComplete="new-password" value={password} onChange={(e) => setPassword(e.target.value)} aria-invalid={bad('password')} />
          {at('password')}
        </div>
      </div>
      {elsewhere}
      <p>
        <button type="submit" className="btn" disabled={busy}>
          {busy ? 'Adding…' : 'Add the person'}
        </button>
      </p>
    </form>
  );
}

// ---------------------------------------------------------------------------------------------------
// API tokens

type Created = TokenView & { token: string };

export function TokensPanel({ initial }: { initial: TokenView[] }) {
  const list = useAdminList<TokenView>(initial, '/api/v1/tokens', (d) => d.tokens!);
  const { rows: tokens, confirming, setConfirming } = list;
  const revoke = (name: string) => list.change<TokenView>('/api/v1/tokens/revoke', { name }, (t) => `The token ${t.name} is revoked: requests that send it are refused.`);

  return (
    <section className="panel" data-testid="tokens">
      <h2 style={{ marginTop: 0 }}>API tokens</h2>
      <p className="muted">Scripts and rig PCs send a token as the header Authorization: Bearer &lt;token&gt; instead of signing in.</p>
      <div className="table-wrap">
        <table className="data" data-testid="tokens-table">
          <thead>
            <tr>
              <th>Name</th>
              <th>Role</th>
              <th>Prefix</th>
              <th>Created (UTC)</th>
              <th>Expires</th>
              <th>Last used</th>
              <th>Revoked</th>
            </tr>
          </thead>
          <tbody>
            {tokens.map((t) => (
              <tr key={t.id} data-testid="token-row">
                <td>{t.name}</td>
                <td>{t.role}</td>
                <td>
                  <code>{t.prefix}…</code>
                </td>
                <td style={dateCell}>{when(t.createdAt)}</td>
                <td style={dateCell}>{t.expiresAt ? when(t.expiresAt) : 'never'}</td>
                <td style={dateCell}>{t.lastUsedAt ? when(t.lastUsedAt) : 'never'}</td>
                <EndCell endedAt={t.revokedAt} action="Revoke" rowKey={t.name} confirming={confirming} onAsk={setConfirming} />
              </tr>
            ))}
          </tbody>
        </table>
      </div>
      {tokens.length === 0 ? <p className="muted">No API tokens yet.</p> : null}
      <ListFooter
        list={list}
        question={confirming ? `Revoke the token ${confirming}? Scripts that send it are refused from now on; this cannot be undone.` : null}
        yes="Yes, revoke"
        onYes={() => confirming && revoke(confirming)}
      />
      <CreateTokenForm onCreated={list.reload} />
    </section>
  );
}

const TOKEN_FIELDS = ['name', 'role', 'expiresDays'] as const;

function CreateTokenForm({ onCreated }: { onCreated: () => void | Promise<void> }) {
  const [name, setName] = useState('');
  const [role, setRole] = useState<Role>('viewer');
  const [days, setDays] = useState('');
  const [busy, setBusy] = useState(false);
  const [created, setCreated] = useState<Created | null>(null);
  const [copied, setCopied] = useState(false);
  const { setError, at, elsewhere, bad } = useFieldErrors(TOKEN_FIELDS);

  const submit = async (e: React.FormEvent) => {
    e.preventDefault();
    setError(null);
    setCreated(null);
    setCopied(false);
    let expiresDays: number | undefined;
    if (days.trim() !== '') {
      expiresDays = Number(days);
      if (!Number.isInteger(expiresDays)) {
        return setError({ code: 'invalid_input', field: 'expiresDays', message: 'expiry is a whole number of days, e.g. 90; leave it empty for a token that does not expire' });
      }
    }
    setBusy(true);
    const r = await postJson<Created>('/api/v1/tokens', { name, role, expiresDays });
    setBusy(false);
    if (!r.ok) return setError(r.error);
    setCreated(r.data);
    setName('');
    setDays('');
    await onCreated();
  };

  const copy = async () => {
    if (!created) return;
    try {
      await navigator.clipboard.writeText(created.token);
      setCopied(true);
    } catch {
      // no clipboard access (plain http on another host): select the text so the person can copy it
      const field = document.getElementById('t-secret') as HTMLInputElement | null;
      field?.select();
    }
  };

  return (
    <form onSubmit={submit} noValidate data-testid="create-token">
      <h3>Create a token</h3>
      <div className="row">
        <div>
          <label htmlFor="t-name">Token name (e.g. rig-pc)</label>
          <input id="t-name" name="name" autoComplete="off" value={name} onChange={(e) => setName(e.target.value)} aria-invalid={bad('name')} />
          {at('name')}
        </div>
        <div className="narrow">
          <label htmlFor="t-role">Token role</label>
          <RoleSelect id="t-role" value={role} onChange={setRole} invalid={bad('role')} />
          {at('role')}
        </div>
        <div>
          <label htmlFor="t-days">Expires after (days, empty: never)</label>
          <input id="t-days" name="expiresDays" type="number" inputMode="numeric" min={1} max={3650} value={days} onChange={(e) => setDays(e.target.value)} aria-invalid={bad('expiresDays')} />
          {at('expiresDays')}
        </div>
      </div>
      {elsewhere}
      <p>
        <button type="submit" className="btn" disabled={busy}>
          {busy ? 'Creating…' : 'Create the token'}
        </button>
      </p>
      {created ? (
        <div className="warning" data-testid="new-token">
          <label htmlFor="t-secret">
            The token {created.name} (role {created.role})
          </label>
          <div className="row">
            <div>
              <input id="t-secret" readOnly value={created.token} onFocus={(e) => e.target.select()} spellCheck={false} />
            </div>
            <div className="narrow">
              <button type="button" className="btn" onClick={copy}>
                {copied ? 'Copied' : 'Copy'}
              </button>
            </div>
          </div>
          <p>
            <strong>Copy it now: it is not shown again.</strong> Only its prefix is kept for the list.
          </p>
          <button type="button" className="btn secondary" onClick={() => setCreated(null)}>
            Done
          </button>
        </div>
      ) : null}
    </form>
  );
}
