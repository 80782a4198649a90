import { notFound } from 'next/navigation';
import { CampaignNav } from '@/components/CampaignNav';
import { RigLog, type QueueItem } from '@/components/RigLog';
import { SafetyNotice } from '@/components/SafetyNotice';
import { isDomainError } from '@/domain/errors';
import { getCampaign } from '@/server/repos/campaigns';
import { listRuns } from '@/server/repos/runs';

export const dynamic = 'force-dynamic';

export default async function RigPage({ params }: { params: Promise<{ id: string; rigId: string }> }) {
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
  const recent = runs.filter((r) => r.slot?.rigId === rigId && (r.state === 'done' || r.state === 'failed')).slice(-8);
  return (
    <>
      <CampaignNav id={id} current="/rigs" name={campaign.name} isDemo={campaign.isDemo} />
      <h2>Rig log: {rig.name}</h2>
      <SafetyNotice compact />
      <RigLog
        campaignId={id}
        rigId={rigId}
        timeZone={rig.timeZone}
        responses={campaign.responses.map((r) => ({ name: r.name, unit: r.unit, goal: r.goal }))}
        robots={campaign.robots.map((r) => ({ id: r.id, name: r.name, massGrams: r.massGrams }))}
        queue={queue}
      />
      {recent.length ? (
        <section className="panel">
          <h2 style={{ marginTop: 0 }}>Logged on this rig</h2>
          <ul>
            {recent.map((r) => (
              <li key={r.id}>
                Run {r.runNumber} ({r.state}):{' '}
                {Object.entries(r.observations)
                  .map(([k, v]) => `${k} ${v}`)
                  .join(', ') || 'no readings'}
              </li>
            ))}
          </ul>
        </section>
      ) : null}
    </>
  );
}
