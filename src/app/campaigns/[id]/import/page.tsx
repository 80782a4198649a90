import { IfMay } from '@/components/role-context';
import Link from 'next/link';
import { notFound } from 'next/navigation';
import { CampaignNav } from '@/components/CampaignNav';
import { ImportTrials } from '@/components/ImportTrials';
import { isDomainError } from '@/domain/errors';
import { getCampaign } from '@/server/repos/campaigns';
import { requirePagePrincipal } from '@/server/auth/page-session';

export const dynamic = 'force-dynamic';

export default async function ImportPage({ params }: { params: Promise<{ id: string }> }) {
  await requirePagePrincipal();
  const { id } = await params;
  const campaign = await getCampaign(id).catch((e) => {
    if (isDomainError(e) && e.code === 'not_found') notFound();
    throw e;
  });
  return (
    <>
      <CampaignNav id={id} current="/import" name={campaign.name} isDemo={campaign.isDemo} />
      <h2>Import past trials</h2>
      <p className="muted">
        Each row becomes a run (source: import) with a finished trial and its readings. Nothing is stored while a row is invalid,
        unless you choose to leave the invalid rows out. Imported trials count in the findings and the next-trial proposals like
        any other.
      </p>
      <IfMay action="plan" otherwise={<p className="muted">Importing trials needs the planner role; ask an admin.</p>}><ImportTrials
        campaignId={id}
        factors={campaign.factors.map((f) => ({ name: f.name, unit: f.unit, kind: f.kind }))}
        responses={campaign.responses.map((r) => ({ name: r.name, unit: r.unit }))}
      /></IfMay>
      <p>
        <Link href={`/campaigns/${id}/rigs`}>Back to the rig log</Link>
      </p>
    </>
  );
}
