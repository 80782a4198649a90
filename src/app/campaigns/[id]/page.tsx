import { IfMay } from '@/components/role-context';
import { notFound } from 'next/navigation';
import { CampaignNav } from '@/components/CampaignNav';
import { DataTable, type ColumnSpec } from '@/components/DataTable';
import { DesignPanel } from '@/components/DesignPanel';
import { isDomainError } from '@/domain/errors';
import { getCampaign, type CampaignView } from '@/server/repos/campaigns';
import { latestDesign, listRuns } from '@/server/repos/runs';
import { requirePagePrincipal } from '@/server/auth/page-session';

export const dynamic = 'force-dynamic';

async function load(id: string): Promise<CampaignView | null> {
  try {
    return await getCampaign(id);
  } catch (e) {
    if (isDomainError(e) && e.code === 'not_found') return null;
    throw e;
  }
}

function factorRange(f: CampaignView['factors'][number]): string {
  if (f.kind === 'continuous') return `${f.low} – ${f.high} ${f.unit ?? ''}`;
  if (f.kind === 'discrete') return `${f.values.join(', ')} ${f.unit ?? ''}`;
  return f.levels.join(', ');
}

export default async function CampaignPage({ params }: { params: Promise<{ id: string }> }) {
  await requirePagePrincipal();
  const { id } = await params;
  const campaign = await load(id);
  if (!campaign) notFound();
  const [runs, design] = await Promise.all([listRuns(id), latestDesign(id)]);
  const columns: ColumnSpec[] = [
    { key: 'order', header: 'Order', format: 'number' },
    { key: 'run', header: 'Run', format: 'number' },
    ...campaign.factors.map((f): ColumnSpec => ({ key: `f:${f.name}`, header: f.unit ? `${f.name} (${f.unit})` : f.name, format: f.kind === 'categorical' ? 'text' : 'number' })),
    ...(runs.some((r) => r.block !== null) ? [{ key: 'block', header: 'Block', format: 'number' } as ColumnSpec] : []),
    { key: 'wholePlot', header: 'Whole plot', format: 'number' },
    { key: 'source', header: 'Source', format: 'text' },
    { key: 'state', header: 'State', format: 'text' },
  ];
  const rows = runs.map((r) => ({
    order: r.plannedOrder,
    run: r.runNumber,
    ...Object.fromEntries(campaign.factors.map((f) => [`f:${f.name}`, r.values[f.name]])),
    block: r.block,
    wholePlot: r.wholePlot,
    source: r.source,
    state: r.state,
  }));
  const d = design?.diagnostics as { dEfficiency?: number; parameters?: number; errorDegreesOfFreedom?: number; notes?: string[] } | undefined;
  return (
    <>
      <CampaignNav id={id} current="" name={campaign.name} isDemo={campaign.isDemo} />
      {campaign.objective ? <p>{campaign.objective}</p> : null}
      <div className="grid2">
        <section className="panel">
          <h2 style={{ marginTop: 0 }}>Factors</h2>
          <div className="table-wrap">
          <table className="data">
            <thead>
              <tr>
                <th>Name</th>
                <th>Kind</th>
                <th>Range or levels</th>
                <th>Hard to change</th>
              </tr>
            </thead>
            <tbody>
              {campaign.factors.map((f) => (
                <tr key={f.id}>
                  <td>{f.name}</td>
                  <td>{f.kind}</td>
                  <td>{factorRange(f)}</td>
                  <td>{f.hardToChange ? `yes (${f.changeMinutes} min per change)` : 'no'}</td>
                </tr>
              ))}
            </tbody>
          </table>
          </div>
        </section>
        <section className="panel">
          <h2 style={{ marginTop: 0 }}>Responses, robots, rigs</h2>
          <ul>
            {campaign.responses.map((r) => (
              <li key={r.id}>
                <strong>{r.name}</strong> {r.unit ? `(${r.unit})` : ''} — {r.goal === 'target' ? `target ${r.target}` : r.goal === 'maximize' ? 'maximise' : 'minimise'}
              </li>
            ))}
          </ul>
          <p>
            Robots: {campaign.robots.map((r) => `${r.name} (${r.massGrams} g)`).join(', ') || 'none'}
            <br />
            Rigs: {campaign.rigs.map((r) => `${r.name} (${r.startTime}–${r.endTime} ${r.timeZone})`).join(', ') || 'none'}
            <br />
            Minutes per trial: {campaign.trialMinutes}
          </p>
        </section>
      </div>
      <IfMay action="plan" otherwise={<p className="muted">Your role may read the design but not change it.</p>}><DesignPanel campaignId={id} hasRuns={runs.length > 0} /></IfMay>
      <section className="panel">
        <h2 style={{ marginTop: 0 }}>Runs</h2>
        {design ? (
          <p className="muted" data-testid="design-summary">
            Design v{design.version}: {design.method}, {design.model} model, seed {design.seed}
            {d?.dEfficiency !== undefined ? `, D-efficiency ${(d.dEfficiency * 100).toFixed(1)}%` : ''}
            {d?.parameters !== undefined ? `, ${d.parameters} parameters` : ''}
            {d?.errorDegreesOfFreedom !== undefined ? `, ${d.errorDegreesOfFreedom} error df` : ''}.
            {d?.notes?.length ? ` ${d.notes.join(' ')}` : ''}
          </p>
        ) : null}
        <DataTable columns={columns} rows={rows} testId="runs-table" />
      </section>
    </>
  );
}
