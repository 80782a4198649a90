import { IfMay } from '@/components/role-context';
import { notFound } from 'next/navigation';
import { CampaignNav } from '@/components/CampaignNav';
import Link from 'next/link';
import { RigLog, type QueueItem } from '@/components/RigLog';
import { RigTrials } from '@/components/RigTrials';
import { SafetyNotice } from '@/components/SafetyNotice';
import { isDomainError } from '@/domain/errors';
import { buildId } from '@/server/build-id';
import { getCampaign } from '@/server/repos/campaigns';
import { rigTrials } from '@/server/repos/rig-log';
import { listRuns } from '@/server/repos/runs';
import { requirePagePrincipal } from '@/server/auth/page-session';

export const dynamic = 'force-dynamic';

export default async function RigPage({ params }: { params: Promise<{ id: string; rigId: string }> }) {
  await requirePagePrincipal();
  const { id, rigId } = await params;
  const campaign = await getCampaign(id).catch((e) => {
    if (isDomainError(e) && e.code === 'not_found') notFound();
    throw e;
  });
  const rig = campaign.rigs.find((r) => r.id === rigId);
  if (!rig) notFound();
  const runs = await listRuns(id);
  const queue: QueueItem[] = runs
    .filter((r) => r.slot?.rigId === rigId && (r.state === 'scheduled' || r.state === 'running'))
    .sort((a, b) => (a.slot!.start < b.slot!.start ? -1 : 1))
    .map((r) => ({ runId: r.id, runNumber: r.runNumber, values: r.values, start: r.slot?.start ?? null, state: r.state, trialId: r.latestTrialId }));
  const logged = await rigTrials(id, rigId);
  return (
    <>
      <CampaignNav id={id} current="/rigs" name={campaign.name} isDemo={campaign.isDemo} />
      <h2>Rig log: {rig.name}</h2>
      <SafetyNotice compact />
      <IfMay action="logTrials" otherwise={<p className="muted" data-testid="read-only">Your role may read this rig log but not log trials; ask an admin for the operator role.</p>}>
      <RigLog
        campaignId={id}
        rigId={rigId}
        timeZone={rig.timeZone}
        responses={campaign.responses.map((r) => ({ name: r.name, unit: r.unit, goal: r.goal }))}
        robots={campaign.robots.map((r) => ({ id: r.id, name: r.name, massGrams: r.massGrams }))}
        queue={queue}
        buildId={buildId()}
      />
      </IfMay>
      <RigTrials campaignId={id} trials={logged} />
      <p>
        <Link href={`/campaigns/${id}/import`}>Import past trials from a spreadsheet</Link>
      </p>
    </>
  );
}
