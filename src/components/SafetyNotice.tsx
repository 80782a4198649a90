/** The cautions shown wherever drive voltage or cells are involved. Local rules take precedence. */
export function SafetyNotice({ compact = false }: { compact?: boolean }) {
  return (
    <aside className="safety" role="note" aria-label="Safety cautions">
      <strong>Safety.</strong>{' '}
      {compact ? (
        <>
          Soft actuators run at high voltage (kV range): power down and discharge before handling the robot. LiPo cells can
          burn: charge in a fire-safe bag, never leave charging unattended, set aside swollen or damaged cells. Your lab&apos;s
          own rules come first.
        </>
      ) : (
        <ul>
          <li>
            Soft actuators on these robots are driven at high voltage (kV range). Switch off and discharge the driver before
            touching the robot, leads or the surface bed; keep one hand away from the rig while it is live.
          </li>
          <li>
            LiPo cells can catch fire. Charge them in a fire-safe container, never unattended; do not use swollen, punctured or
            crushed cells, and keep a suitable extinguisher near the rig.
          </li>
          <li>Wear eye protection near a hopping robot. Follow your laboratory&apos;s local safety rules; they take precedence over this note.</li>
        </ul>
      )}
    </aside>
  );
}
