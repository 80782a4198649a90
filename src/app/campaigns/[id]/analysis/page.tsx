import { notFound } from 'next/navigation';
import { AnalysisPanel } from '@/components/AnalysisPanel';
import type { AnalysisViewData } from '@/components/AnalysisView';
import { CampaignNav } from '@/components/CampaignNav';
import { isDomainError } from '@/domain/errors';
import { observationFields } from '@/domain/metrics/standard-readings';
import { latestAnalysis } from '@/server/repos/analyses';
import { getCampaign } from '@/server/repos/campaigns';
import { requirePagePrincipal } from '@/server/auth/page-session';

export const dynamic = 'force-dynamic';

export default async function AnalysisPage({ params }: { params: Promise<{ id: string }> }) {
  await requirePagePrincipal();
  const { id } = await params;
  const campaign = await getCampaign(id).catch((e) => {
    if (isDomainError(e) && e.code === 'not_found') notFound();
    throw e;
  });
  const latest = await latestAnalysis(id);
  return (
    <>
      <CampaignNav id={id} current="/analysis" name={campaign.name} isDemo={campaign.isDemo} />
      <p className="muted">
        Least squares by Householder QR with column pivoting on the logged trials, factors in coded units. When the runs share whole
        plots (hard-to-change factors), the fit is a split plot instead: a whole-plot random effect by restricted maximum likelihood,
        with Kenward–Roger degrees of freedom. Each fit is stored with the data it used. <a href={`/campaigns/${id}/report`}>Printable findings report</a>
      </p>
      <AnalysisPanel campaignId={id} responses={[...campaign.responses.map((r) => r.name), ...observationFields(campaign.responses).filter((f) => !f.response).map((f) => f.name)]} initial={latest as AnalysisViewData | null} />
    </>
  );
}
