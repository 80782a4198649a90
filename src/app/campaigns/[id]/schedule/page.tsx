import Link from 'next/link';
import { notFound } from 'next/navigation';
import { CampaignNav } from '@/components/CampaignNav';
import { SchedulePanel } from '@/components/SchedulePanel';
import { isDomainError } from '@/domain/errors';
import { getCampaign } from '@/server/repos/campaigns';
import { listSlots } from '@/server/repos/schedule';

export const dynamic = 'force-dynamic';

function dayKey(iso: string, timeZone: string): string {
  return new Intl.DateTimeFormat('en-CA', { timeZone, year: 'numeric', month: '2-digit', day: '2-digit', weekday: 'short' }).format(new Date(iso));
}
function clock(iso: string, timeZone: string): string {
  return new Intl.DateTimeFormat('en-GB', { timeZone, hour: '2-digit', minute: '2-digit' }).format(new Date(iso));
}

export default async function SchedulePage({ params }: { params: Promise<{ id: string }> }) {
  const { id } = await params;
  const campaign = await getCampaign(id).catch((e) => {
    if (isDomainError(e) && e.code === 'not_found') notFound();
    throw e;
  });
  const slots = await listSlots(id);
  const today = new Date().toISOString().slice(0, 10);
  const factorNames = campaign.factors.map((f) => f.name);
  return (
    <>
      <CampaignNav id={id} current="/schedule" name={campaign.name} isDemo={campaign.isDemo} />
      <SchedulePanel campaignId={id} defaultStart={today} />
      {campaign.rigs.map((rig) => {
        const mine = slots.filter((s) => s.rigId === rig.id);
        const days = new Map<string, typeof mine>();
        for (const s of mine) {
          const k = dayKey(s.start, rig.timeZone);
          days.set(k, [...(days.get(k) ?? []), s]);
        }
        return (
          <section className="panel" key={rig.id} data-testid="rig-plan">
            <h2 style={{ marginTop: 0 }}>
              {rig.name} <span className="muted">({rig.timeZone}, {rig.startTime}–{rig.endTime})</span>{' '}
              <Link href={`/campaigns/${id}/rigs/${rig.id}`}>open rig log</Link>
            </h2>
            {mine.length === 0 ? <p className="muted">No runs placed on this rig.</p> : null}
            {[...days.entries()].map(([day, list]) => (
              <div key={day}>
                <h3>{day}</h3>
                <table className="data">
                  <thead>
                    <tr>
                      <th>Time</th>
                      <th>Run</th>
                      {factorNames.map((n) => (
                        <th key={n}>{n}</th>
                      ))}
                      <th>State</th>
                    </tr>
                  </thead>
                  <tbody>
                    {list.map((s) => (
                      <tr key={s.slotId}>
                        <td>
                          {clock(s.start, rig.timeZone)}–{clock(s.end, rig.timeZone)}
                        </td>
                        <td>{s.runNumber}</td>
                        {factorNames.map((n) => (
                          <td key={n}>{String(s.values[n] ?? '')}</td>
                        ))}
                        <td>{s.state}</td>
                      </tr>
                    ))}
                  </tbody>
                </table>
              </div>
            ))}
          </section>
        );
      })}
    </>
  );
}
