import Link from 'next/link';

const STEPS = [
  { href: '', label: '1 · Plan & design' },
  { href: '/schedule', label: '2 · Week plan' },
  { href: '/rigs', label: '3 · Rig log' },
  { href: '/analysis', label: '4 · Findings' },
  { href: '/next', label: '5 · Next trials' },
] as const;

export function CampaignNav({ id, current, name, isDemo }: { id: string; current: string; name: string; isDemo: boolean }) {
  return (
    <>
      <h1>
        {name}
        {isDemo ? <span className="badge demo">demo data: invented scenario</span> : null}
      </h1>
      <nav className="steps" aria-label="Campaign steps">
        {STEPS.map((s) => (
          <Link key={s.href} href={`/campaigns/${id}${s.href}`} className={current === s.href ? 'current' : undefined} aria-current={current === s.href ? 'page' : undefined}>
            {s.label}
          </Link>
        ))}
      </nav>
    </>
  );
}
