import { notFound } from 'next/navigation';
import { AnalysisView, type AnalysisViewData } from '@/components/AnalysisView';
import { PrintButton } from '@/components/PrintButton';
import { isDomainError } from '@/domain/errors';
import { RIG_COLUMN, WHOLE_PLOT_COLUMN, campaignData, latestAnalysis } from '@/server/repos/analyses';
import { getCampaign } from '@/server/repos/campaigns';
import { requirePagePrincipal } from '@/server/auth/page-session';

export const dynamic = 'force-dynamic';

/** The campaign's findings on paper: every response's latest fit, its plots and tables, and the data used. */
export default async function ReportPage({ params }: { params: Promise<{ id: string }> }) {
  await requirePagePrincipal();
  const { id } = await params;
  const campaign = await getCampaign(id).catch((e) => {
    if (isDomainError(e) && e.code === 'not_found') notFound();
    throw e;
  });
  const fits = (await Promise.all(campaign.responses.map((r) => latestAnalysis(id, r.name)))).filter((f) => f !== null);
  const { rows } = await campaignData(id);
  const columns = [...campaign.factors.map((f) => f.name), ...campaign.responses.map((r) => r.name)];
  // Whole plot and rig where any trial has them (run order is the row order: trials as they started).
  const extra = [
    { key: WHOLE_PLOT_COLUMN, header: 'Whole plot' },
    { key: RIG_COLUMN, header: 'Rig' },
  ].filter((c) => rows.some((r) => r[c.key] !== undefined));
  return (
    <article className="report">
      <h1>
        Findings: {campaign.name}
        {campaign.isDemo ? <span className="badge demo">demo data: invented scenario</span> : null}
      </h1>
      <p>{campaign.objective}</p>
      <p className="muted">
        Printed {new Date().toISOString().slice(0, 16).replace('T', ' ')} UTC. Factors:{' '}
        {campaign.factors.map((f) => `${f.name}${f.unit ? ` (${f.unit})` : ''}`).join(', ')}. Fits by least squares (Householder QR with column pivoting), factors in coded units; runs sharing whole plots (hard-to-change factors) are fitted as a split plot (whole-plot random effect by REML, Kenward–Roger degrees of freedom).
      </p>
      <PrintButton />
      {fits.length === 0 ? <p>No model has been fitted yet.</p> : null}
      {fits.map((f) => (
        <AnalysisView key={f!.id} data={f as unknown as AnalysisViewData} />
      ))}
      <section className="panel">
        <h2 style={{ marginTop: 0 }}>Data used ({rows.length} finished trials, in the order they started)</h2>
        <div className="table-wrap">
          <table className="data">
            <thead>
              <tr>
                <th>Order</th>
                <th>Run</th>
                {extra.map((c) => (
                  <th key={c.key}>{c.header}</th>
                ))}
                {columns.map((c) => (
                  <th key={c}>{c}</th>
                ))}
              </tr>
            </thead>
            <tbody>
              {rows.map((r, i) => (
                <tr key={i}>
                  <td>{i + 1}</td>
                  <td>{String(r.run)}</td>
                  {extra.map((c) => (
                    <td key={c.key}>{r[c.key] === undefined ? '—' : String(r[c.key])}</td>
                  ))}
                  {columns.map((c) => (
                    <td key={c}>{r[c] === undefined ? '—' : typeof r[c] === 'number' ? Number((r[c] as number).toPrecision(5)) : String(r[c])}</td>
                  ))}
                </tr>
              ))}
            </tbody>
          </table>
        </div>
      </section>
    </article>
  );
}
