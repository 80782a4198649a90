import { PeoplePanel, TokensPanel } from '@/components/AccountsPanels';
import { listTokens, listUsers } from '@/server/auth/accounts';
import { requirePagePrincipal } from '@/server/auth/page-session';
import { may } from '@/server/auth/roles';

export const dynamic = 'force-dynamic';

export default async function AccountsPage() {
  await requirePagePrincipal();
  // the same check again, answered from the credential cache: who is asking decides what is loaded
  const who = await requirePagePrincipal();
  if (!may(who.role, 'administer')) {
    return (
      <>
        <h1>Accounts</h1>
        <p className="muted" data-testid="admins-only">
          This page is for administrators. Ask an admin to add a person or an API token.
        </p>
      </>
    );
  }
  const [users, tokens] = await Promise.all([listUsers(), listTokens()]);
  return (
    <>
      <h1>Accounts</h1>
      <p className="muted">
        People sign in with their e-mail and password; scripts use API tokens. The same can be done on the command line
        (<code>npm run saltus -- user …</code>, <code>token …</code>). Every change is written to the audit trail.
      </p>
      <PeoplePanel initial={users} me={who.actor} />
      <TokensPanel initial={tokens} />
    </>
  );
}
