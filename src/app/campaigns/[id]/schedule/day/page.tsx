import Link from 'next/link';
import '@/app/plan.css';
import { notFound } from 'next/navigation';
import { CampaignNav } from '@/components/CampaignNav';
import { SheetPrintButton } from '@/components/SheetPrintButton';
import { isDomainError } from '@/domain/errors';
import { addCalendarDays, daySheet } from '@/domain/schedule';
import { loadPlan } from '@/server/repos/week-plan';
import { requirePagePrincipal } from '@/server/auth/page-session';

export const dynamic = 'force-dynamic';

const hm = (minutes: number) => `${Math.floor(minutes / 60)} h ${String(Math.round(minutes % 60)).padStart(2, '0')} min`;

export default async function DaySheetPage({ params, searchParams }: { params: Promise<{ id: string }>; searchParams: Promise<{ rig?: string; day?: string }> }) {
  await requirePagePrincipal();
  const { id } = await params;
  const q = await searchParams;
  const plan = await loadPlan(id).catch((e) => {
    if (isDomainError(e) && e.code === 'not_found') notFound();
    throw e;
  });
  const campaign = plan.campaign;
  const rig = campaign.rigs.find((r) => r.id === q.rig || r.name === q.rig) ?? campaign.rigs[0];
  const day = q.day && /^\d{4}-\d{2}-\d{2}$/.test(q.day) ? q.day : plan.from;
  if (!rig) notFound();
  const sheet = daySheet(plan.request, plan.result, rig.name, day, rig.timeZone);
  const factorNames = campaign.factors.map((f) => f.name);
  const title = new Intl.DateTimeFormat('en-GB', { timeZone: 'UTC', weekday: 'long', day: 'numeric', month: 'long', year: 'numeric' }).format(new Date(`${day}T12:00:00Z`));
  const link = (d: string, r = rig.id) => `/campaigns/${id}/schedule/day?rig=${r}&day=${d}`;
  return (
    <>
      <div className="no-print">
        <CampaignNav id={id} current="/schedule/day" name={campaign.name} isDemo={campaign.isDemo} />
        <p>
          <Link href={`/campaigns/${id}/schedule`}>← week plan</Link>
          {' · '}
          <Link href={link(addCalendarDays(day, -1))}>previous day</Link>
          {' · '}
          <Link href={link(addCalendarDays(day, 1))}>next day</Link>
          {campaign.rigs
            .filter((r) => r.id !== rig.id)
            .map((r) => (
              <span key={r.id}>
                {' · '}
                <Link href={link(day, r.id)}>{r.name}</Link>
              </span>
            ))}
        </p>
      </div>
      <section className="panel sheet-page" data-testid="day-sheet">
        <div className="sheet-head">
          <h2 style={{ marginTop: 0 }}>
            {rig.name} — {title}
          </h2>
          <SheetPrintButton />
        </div>
        <p className="print-only">
          {campaign.name}
          {campaign.isDemo ? ' (demo data: invented scenario)' : ''}
        </p>
        <p>
          Hours ({sheet.timeZone}):{' '}
          {sheet.available.length
            ? sheet.available.map((a) => `${new Intl.DateTimeFormat('en-GB', { timeZone: sheet.timeZone, hour: '2-digit', minute: '2-digit' }).format(new Date(a.start))}–${new Intl.DateTimeFormat('en-GB', { timeZone: sheet.timeZone, hour: '2-digit', minute: '2-digit' }).format(new Date(a.end))}`).join(', ')
            : 'rig closed'}
          . {sheet.totals.trials} trials ({hm(sheet.totals.trialMinutes)}), {sheet.totals.changeovers} changeovers ({hm(sheet.totals.changeoverMinutes)})
          {sheet.totals.upkeeps ? `, ${sheet.totals.upkeeps} upkeeps (${hm(sheet.totals.upkeepMinutes)})` : ''}.
        </p>
        {sheet.rows.length === 0 ? (
          <p className="muted">Nothing is planned on this rig this day.</p>
        ) : (
          <div className="table-wrap">
            <table className="data sheet">
              <thead>
                <tr>
                  <th>Time</th>
                  <th>What</th>
                  <th>Run</th>
                  <th>Whole plot</th>
                  {factorNames.map((n) => (
                    <th key={n}>{n}</th>
                  ))}
                  <th>Done</th>
                  <th>Notes</th>
                </tr>
              </thead>
              <tbody>
                {sheet.rows.map((row) => (
                  <tr key={`${row.kind}-${row.runId}`} className={row.kind}>
                    <td>
                      {row.startLocal}–{row.endLocal}
                    </td>
                    <td>{row.kind === 'trial' ? 'trial' : row.kind === 'changeover' ? 'changeover' : 'upkeep (battery, inspection)'}</td>
                    <td>{row.kind === 'trial' ? row.runId : `before ${row.runId}`}</td>
                    <td>{row.wholePlot !== undefined ? String(row.wholePlot) : ''}</td>
                    {factorNames.map((n) => (
                      <td key={n}>{row.values?.[n] !== undefined ? String(row.values[n]) : ''}</td>
                    ))}
                    <td className="check">☐</td>
                    <td style={{ minWidth: '8rem' }} />
                  </tr>
                ))}
              </tbody>
            </table>
          </div>
        )}
        <p className="muted">Run the trials in the order listed: the order inside a whole plot is part of the design&apos;s randomisation.</p>
      </section>
    </>
  );
}
