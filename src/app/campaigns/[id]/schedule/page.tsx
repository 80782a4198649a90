import { IfMay } from '@/components/role-context';
import Link from 'next/link';
import '@/app/plan.css';
import { notFound } from 'next/navigation';
import { CampaignNav } from '@/components/CampaignNav';
import { MovePanel, type MovablePlot } from '@/components/MovePanel';
import { SchedulePanel } from '@/components/SchedulePanel';
import { isDomainError } from '@/domain/errors';
import { addCalendarDays, clockInZone, dayInZone, weekGrid } from '@/domain/schedule';
import { MOVABLE_STATES } from '@/server/plan/week-plan';
import { listSlots } from '@/server/repos/schedule';
import { loadPlan } from '@/server/repos/week-plan';
import { requirePagePrincipal } from '@/server/auth/page-session';

export const dynamic = 'force-dynamic';

function dayKey(iso: string, timeZone: string): string {
  return new Intl.DateTimeFormat('en-CA', { timeZone, year: 'numeric', month: '2-digit', day: '2-digit', weekday: 'short' }).format(new Date(iso));
}
function clock(iso: string, timeZone: string): string {
  return new Intl.DateTimeFormat('en-GB', { timeZone, hour: '2-digit', minute: '2-digit' }).format(new Date(iso));
}
function dayTitle(day: string): string {
  return new Intl.DateTimeFormat('en-GB', { timeZone: 'UTC', weekday: 'short', day: 'numeric', month: 'short' }).format(new Date(`${day}T12:00:00Z`));
}

export default async function SchedulePage({ params, searchParams }: { params: Promise<{ id: string }>; searchParams: Promise<{ from?: string }> }) {
  await requirePagePrincipal();
  const { id } = await params;
  const query = await searchParams;
  const from = query.from && /^\d{4}-\d{2}-\d{2}$/.test(query.from) ? query.from : undefined;
  const plan = await loadPlan(id, { from }).catch((e) => {
    if (isDomainError(e) && e.code === 'not_found') notFound();
    throw e;
  });
  const campaign = plan.campaign;
  const slots = await listSlots(id);
  const today = new Date().toISOString().slice(0, 10);
  const factorNames = campaign.factors.map((f) => f.name);
  const rigIdByName = new Map(campaign.rigs.map((r) => [r.name, r.id]));
  const weekFrom = from ?? plan.firstOpenDay;
  const grid = campaign.rigs.length ? weekGrid(plan.request, plan.result, weekFrom, 7) : null;
  // Days on which no rig works and nothing is planned (a weekend) are left out to give the others room.
  const shownDays = grid ? grid.days.map((d, j) => ({ d, j })).filter(({ j }) => grid.cells[j]!.some((c) => c.available.length > 0 || c.rows.length > 0)) : [];

  // Whole plots (and lone runs) that may still move, with where they stand now.
  const plots: MovablePlot[] = [];
  const seen = new Set<string>();
  for (const r of plan.request.runs) {
    const stored = plan.runsById.get(r.id)!;
    if (!MOVABLE_STATES.has(stored.state)) continue;
    const key = r.wholePlot !== undefined ? `wp:${String(r.wholePlot)}` : `run:${r.id}`;
    if (seen.has(key)) continue;
    seen.add(key);
    const members = r.wholePlot !== undefined ? plan.request.runs.filter((x) => x.wholePlot !== undefined && String(x.wholePlot) === String(r.wholePlot)) : [r];
    const first = plan.result.assignments.filter((a) => members.some((m) => m.id === a.runId)).sort((a, b) => Date.parse(a.start) - Date.parse(b.start))[0];
    if (!first) continue;
    const rig = plan.rigsByName.get(first.rig)!;
    plots.push({
      key,
      ...(r.wholePlot !== undefined ? { wholePlot: Number(r.wholePlot) } : { runId: r.id }),
      label: r.wholePlot !== undefined ? `whole plot ${String(r.wholePlot)}` : `run ${r.id}`,
      runs: members.map((m) => ({ id: m.id, values: m.values })),
      rigId: rig.id,
      day: dayInZone(Date.parse(first.start), rig.timeZone),
      time: clockInZone(Date.parse(first.start), rig.timeZone),
    });
  }

  return (
    <>
      <CampaignNav id={id} current="/schedule" name={campaign.name} isDemo={campaign.isDemo} />
      <IfMay action="plan" otherwise={<p className="muted">Your role may read the schedule but not change it.</p>}><SchedulePanel campaignId={id} defaultStart={today} /></IfMay>
      {grid && plan.result.assignments.length ? (
        <section className="panel" data-testid="week-grid">
          <div className="sheet-head">
            <h2 style={{ marginTop: 0 }}>Week from {dayTitle(weekFrom)}</h2>
            <span className="no-print">
              <Link href={`/campaigns/${id}/schedule?from=${addCalendarDays(weekFrom, -7)}`}>← previous week</Link>{' · '}
              <Link href={`/campaigns/${id}/schedule?from=${addCalendarDays(weekFrom, 7)}`}>next week →</Link>
            </span>
          </div>
          <p className="muted">
            {plan.result.assignments.length} trials placed, {plan.result.changeovers} changeovers ({Math.round(plan.result.changeoverMinutesTotal)} min)
            {plan.result.unscheduled.length ? `; ${plan.result.unscheduled.length} runs not placed yet` : ''}. Times in {grid.timeZone}
            {shownDays.length < grid.days.length ? `; days when no rig works are left out` : ''}.
          </p>
          <div className="legend-row" aria-hidden="true">
            <span className="slot-block trial">trial</span>
            <span className="slot-block changeover">changeover</span>
            <span className="slot-block upkeep">upkeep</span>
          </div>
          <div className="week-wrap">
            <table className="week">
              <thead>
                <tr>
                  <th className="rig">Rig</th>
                  {shownDays.map(({ d }) => (
                    <th key={d}>{dayTitle(d)}</th>
                  ))}
                </tr>
              </thead>
              <tbody>
                {grid.rigs.map((rigName, k) => (
                  <tr key={rigName}>
                    <th className="rig" scope="row">
                      {rigName}
                    </th>
                    {shownDays.map(({ d, j }) => {
                      const cell = grid.cells[j]![k]!;
                      return (
                        <td key={d} className={cell.available.length ? undefined : 'off'} data-rig={rigName} data-day={d}>
                          {cell.rows.map((row) =>
                            row.kind === 'trial' ? (
                              <div key={`t${row.runId}`} className={`slot-block trial${MOVABLE_STATES.has(plan.runsById.get(row.runId)?.state ?? '') ? '' : ' tried'}`} title={row.label} data-testid="trial-block">
                                {row.startLocal} #{row.runId}
                                {row.wholePlot !== undefined ? <span className="wp"> WP{String(row.wholePlot)}</span> : null}
                              </div>
                            ) : (
                              <div key={`${row.kind}${row.runId}`} className={`slot-block ${row.kind}`} title={row.label} data-testid={row.kind}>
                                {row.startLocal}–{row.endLocal} {row.kind === 'changeover' ? `change ${Object.entries(row.values ?? {}).map(([f, v]) => `${f} → ${String(v)}`).join(', ')}` : 'upkeep'}
                              </div>
                            ),
                          )}
                          {cell.rows.length && rigIdByName.get(rigName) ? (
                            <Link className="no-print" href={`/campaigns/${id}/schedule/day?rig=${rigIdByName.get(rigName)}&day=${d}`}>
                              day sheet
                            </Link>
                          ) : null}
                        </td>
                      );
                    })}
                  </tr>
                ))}
              </tbody>
            </table>
          </div>
        </section>
      ) : null}
      <IfMay action="plan"><MovePanel campaignId={id} plots={plots} rigs={campaign.rigs.map((r) => ({ id: r.id, name: r.name }))} factors={factorNames.filter((f) => !campaign.factors.find((x) => x.name === f)?.hardToChange)} /></IfMay>
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
              {mine.length ? (
                <>
                  {' · '}
                  <a href={`/api/v1/campaigns/${id}/schedule/calendar?rig=${rig.id}`} download>
                    iCalendar file
                  </a>
                </>
              ) : null}
            </h2>
            {mine.length === 0 ? <p className="muted">No runs placed on this rig.</p> : null}
            {[...days.entries()].map(([day, list]) => {
              const iso = dayInZone(Date.parse(list[0]!.start), rig.timeZone);
              return (
                <div key={day}>
                  <h3>
                    {day} <Link href={`/campaigns/${id}/schedule/day?rig=${rig.id}&day=${iso}`}>printable day sheet</Link>
                  </h3>
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
              );
            })}
          </section>
        );
      })}
    </>
  );
}
