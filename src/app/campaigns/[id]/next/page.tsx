import { IfMay } from '@/components/role-context';
import { notFound } from 'next/navigation';
import { CampaignNav } from '@/components/CampaignNav';
import { NextTrialPanel } from '@/components/NextTrialPanel';
import { SurrogatePanel } from '@/components/SurrogatePanel';
import { isDomainError } from '@/domain/errors';
import { getCampaign } from '@/server/repos/campaigns';
import { listSuggestions } from '@/server/repos/suggestions';
import { requirePagePrincipal } from '@/server/auth/page-session';

export const dynamic = 'force-dynamic';

export default async function NextTrialsPage({ params, searchParams }: { params: Promise<{ id: string }>; searchParams: Promise<{ job?: string | string[] }> }) {
  await requirePagePrincipal();
  const { id } = await params;
  const jobParam = (await searchParams).job;
  const initialJob = typeof jobParam === 'string' && /^[A-Za-z0-9_-]{1,64}$/.test(jobParam) ? jobParam : null;
  const campaign = await getCampaign(id).catch((e) => {
    if (isDomainError(e) && e.code === 'not_found') notFound();
    throw e;
  });
  const suggestions = await listSuggestions(id);
  const units = Object.fromEntries(campaign.factors.map((f) => [f.name, f.unit ?? '']));
  return (
    <>
      <CampaignNav id={id} current="/next" name={campaign.name} isDemo={campaign.isDemo} />
      <IfMay action="plan" otherwise={<p className="muted">Your role may read proposals but not make them.</p>}><SurrogatePanel campaignId={id} responses={campaign.responses.map((r) => ({ name: r.name, unit: r.unit }))} units={units} initialJob={initialJob} /></IfMay>
      <h2>Most informative trial for the linear model</h2>
      <p className="muted">
        The setting the campaign&apos;s runs know least about: the candidate with the largest prediction variance under the chosen
        model. Accepting it adds a run to the campaign.
      </p>
      <IfMay action="plan"><NextTrialPanel campaignId={id} units={units} /></IfMay>
      {suggestions.length ? (
        <section className="panel">
          <h2 style={{ marginTop: 0 }}>Earlier proposals</h2>
          <ul>
            {suggestions.map((s) => (
              <li key={s.id}>
                <strong>{s.status}</strong>{' '}
                {Object.entries(s.values)
                  .map(([k, v]) => `${k} ${typeof v === 'number' ? Number(v.toPrecision(4)) : v}`)
                  .join(' · ')}{' '}
                — <span className="muted">{s.reason}</span>
              </li>
            ))}
          </ul>
        </section>
      ) : null}
    </>
  );
}
