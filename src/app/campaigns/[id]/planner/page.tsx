import { IfMay } from '@/components/role-context';
import Link from 'next/link';
import '@/app/plan.css';
import { notFound } from 'next/navigation';
import { CampaignNav } from '@/components/CampaignNav';
import { PlannerPanel, type CandidateSpec } from '@/components/PlannerPanel';
import { isDomainError } from '@/domain/errors';
import { compileModel, standardTerms } from '@/domain/factors';
import { domainFactors, getCampaign } from '@/server/repos/campaigns';
import { listRuns } from '@/server/repos/runs';
import { requirePagePrincipal } from '@/server/auth/page-session';

export const dynamic = 'force-dynamic';

export default async function PlannerPage({ params, searchParams }: { params: Promise<{ id: string }>; searchParams: Promise<{ jobs?: string | string[] }> }) {
  await requirePagePrincipal();
  const { id } = await params;
  // Candidate searches still running or finished, by candidate position (the panel puts them in the URL).
  const jobsParam = (await searchParams).jobs;
  const initialJobs = (typeof jobsParam === 'string' ? jobsParam : '').split(',').slice(0, 3).map((j) => (/^[A-Za-z0-9_-]{1,64}$/.test(j) ? j : ''));
  const campaign = await getCampaign(id).catch((e) => {
    if (isDomainError(e) && e.code === 'not_found') notFound();
    throw e;
  });
  const runs = await listRuns(id);
  const hard = campaign.factors.filter((f) => f.hardToChange);
  const easy = campaign.factors.length - hard.length;
  // Default pair: the full factorial against a smaller optimal design for the same interactions model
  // (three runs more than its parameters, a choice of ours); with hard-to-change factors the optimal one
  // is split-plot with whole plots of about three runs.
  const base: CandidateSpec = { method: 'full-factorial', model: 'interactions', runs: '', centerPoints: '', wholePlots: '', criterion: '', seed: '1' };
  const factors = domainFactors(campaign);
  const parameters = compileModel(factors, standardTerms(factors, 'interactions')).labels.length;
  const runsB = parameters + 3;
  const optimal: CandidateSpec = {
    ...base,
    method: 'optimal',
    runs: String(runsB),
    wholePlots: hard.length && easy ? String(Math.max(2, Math.round(runsB / 3))) : '',
  };
  return (
    <>
      <CampaignNav id={id} current="/planner" name={campaign.name} isDemo={campaign.isDemo} />
      <p>
        <Link href={`/campaigns/${id}`}>← back to Plan &amp; design</Link>
        {hard.length ? <span className="muted"> Hard-to-change: {hard.map((f) => `${f.name} (${f.changeMinutes} min per change)`).join(', ')}; give whole plots for a split-plot candidate.</span> : null}
      </p>
      <IfMay action="plan" otherwise={<p className="muted">Your role may read the plan but not change it.</p>}><PlannerPanel campaignId={id} defaults={[base, optimal]} hasRuns={runs.length > 0} initialJobs={initialJobs.some(Boolean) ? initialJobs : []} /></IfMay>
    </>
  );
}
