import { IfMay } from '@/components/role-context';
import Link from 'next/link';
import { SafetyNotice } from '@/components/SafetyNotice';
import { listCampaigns } from '@/server/repos/campaigns';
import { requirePagePrincipal } from '@/server/auth/page-session';

export const dynamic = 'force-dynamic';

export default async function Home() {
  await requirePagePrincipal();
  const campaigns = await listCampaigns();
  return (
    <>
      <h1>Test campaigns</h1>
      <p className="muted">
        A campaign asks which factors drive a robot&apos;s hops. Plan it as a designed experiment, place its runs on the rigs,
        log each trial at the rig, fit the results, and let Saltus propose the next most informative trial.
      </p>
      <IfMay action="createCampaign">
        <p>
          <Link className="btn" href="/campaigns/new">
            New campaign
          </Link>
        </p>
      </IfMay>
      <div className="grid2">
        {campaigns.map((c) => (
          <section key={c.id} className="panel" data-testid="campaign-card">
            <h2 style={{ marginTop: 0 }}>
              <Link href={`/campaigns/${c.id}`}>{c.name}</Link>
              {c.isDemo ? <span className="badge demo">demo data</span> : null}
            </h2>
            <p className="muted">{c.objective || 'No objective written yet.'}</p>
            <p>
              {c.factors} factors · {c.runs} runs · {c.trials} trials
            </p>
          </section>
        ))}
      </div>
      {campaigns.length === 0 ? <p className="muted">No campaigns yet. Create one to begin.</p> : null}
      <SafetyNotice />
    </>
  );
}
