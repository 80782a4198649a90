import Link from 'next/link';
import { notFound } from 'next/navigation';
import { CampaignNav } from '@/components/CampaignNav';
import { SafetyNotice } from '@/components/SafetyNotice';
import { isDomainError } from '@/domain/errors';
import { getCampaign } from '@/server/repos/campaigns';
import { requirePagePrincipal } from '@/server/auth/page-session';

export const dynamic = 'force-dynamic';

export default async function RigsPage({ params }: { params: Promise<{ id: string }> }) {
  await requirePagePrincipal();
  const { id } = await params;
  const campaign = await getCampaign(id).catch((e) => {
    if (isDomainError(e) && e.code === 'not_found') notFound();
    throw e;
  });
  return (
    <>
      <CampaignNav id={id} current="/rigs" name={campaign.name} isDemo={campaign.isDemo} />
      <SafetyNotice />
      <div className="grid2">
        {campaign.rigs.map((r) => (
          <section className="panel" key={r.id}>
            <h2 style={{ marginTop: 0 }}>{r.name}</h2>
            <p className="muted">
              {r.startTime}–{r.endTime} {r.timeZone}
            </p>
            <Link className="btn" href={`/campaigns/${id}/rigs/${r.id}`}>
              Open rig log
            </Link>
          </section>
        ))}
      </div>
      {campaign.rigs.length === 0 ? <p className="muted">This campaign has no rig.</p> : null}
    </>
  );
}
