/**
 * Small SVG charts of the planner page: a heat grid of |r| between model columns and the
 * fraction-of-design-space curve of scaled prediction variance. Plain SVG, no chart library.
 */

/** A shade from white (|r| = 0) to dark teal (|r| = 1); values outside [0, 1] are clipped. */
export function heatShade(value: number): string {
  const t = Math.min(1, Math.max(0, Math.abs(value)));
  const mix = (a: number, b: number) => Math.round(a + (b - a) * t);
  return `rgb(${mix(255, 23)}, ${mix(255, 80)}, ${mix(255, 68)})`;
}

export interface ChartBox {
  width: number;
  height: number;
  left: number;
  right: number;
  top: number;
  bottom: number;
}

/** Linear map of [d0, d1] onto [r0, r1]; a zero-width domain maps to the middle of the range. */
export function linearScale(d0: number, d1: number, r0: number, r1: number): (v: number) => number {
  if (d1 === d0) return () => (r0 + r1) / 2;
  return (v) => r0 + ((v - d0) / (d1 - d0)) * (r1 - r0);
}

/** An SVG path "M x y L x y ..." through the points, rounded to 0.1 px. */
export function linePath(xs: readonly number[], ys: readonly number[], x: (v: number) => number, y: (v: number) => number): string {
  return xs.map((v, i) => `${i === 0 ? 'M' : 'L'}${x(v).toFixed(1)} ${y(ys[i]!).toFixed(1)}`).join(' ');
}

/** Tick values: `count` + 1 evenly spaced from lo to hi. */
export function ticks(lo: number, hi: number, count = 4): number[] {
  return Array.from({ length: count + 1 }, (_, i) => lo + ((hi - lo) * i) / count);
}

export function CorrelationMap({ labels, values, title }: { labels: string[]; values: number[][]; title: string }) {
  const cell = labels.length > 12 ? 16 : 22;
  const margin = 8 + Math.min(150, Math.max(...labels.map((l) => l.length), 1) * 6);
  const size = margin + cell * labels.length + 4;
  return (
    <figure style={{ margin: 0 }}>
      <svg role="img" aria-label={title} data-testid="correlation-map" width={size} height={size} viewBox={`0 0 ${size} ${size}`} style={{ maxWidth: '100%', height: 'auto' }}>
        {labels.map((l, i) => (
          <text key={`r${i}`} x={margin - 4} y={margin + cell * i + cell * 0.7} fontSize={10} textAnchor="end">
            {l.length > 24 ? `${l.slice(0, 23)}…` : l}
          </text>
        ))}
        {labels.map((l, j) => (
          <text key={`c${j}`} transform={`translate(${margin + cell * j + cell * 0.7}, ${margin - 4}) rotate(-60)`} fontSize={10}>
            {l.length > 24 ? `${l.slice(0, 23)}…` : l}
          </text>
        ))}
        {values.map((row, i) =>
          row.map((v, j) => (
            <rect key={`${i}-${j}`} x={margin + cell * j} y={margin + cell * i} width={cell - 1} height={cell - 1} fill={heatShade(v)} stroke="#d5dbdf" strokeWidth={0.5}>
              <title>{`${labels[i]} × ${labels[j]}: |r| = ${Math.abs(v).toFixed(2)}`}</title>
            </rect>
          )),
        )}
      </svg>
      <figcaption className="muted" style={{ fontSize: '0.8rem' }}>
        |r| between model columns: white 0, dark 1.
      </figcaption>
    </figure>
  );
}

export interface FdsSeries {
  name: string;
  colour: string;
  fraction: number[];
  variance: number[];
}

export function FdsChart({ series }: { series: FdsSeries[] }) {
  const box: ChartBox = { width: 420, height: 240, left: 44, right: 12, top: 12, bottom: 34 };
  const all = series.flatMap((s) => s.variance);
  const hi = all.length ? Math.max(...all) * 1.05 : 1;
  const x = linearScale(0, 1, box.left, box.width - box.right);
  const y = linearScale(0, hi, box.height - box.bottom, box.top);
  return (
    <figure style={{ margin: 0 }}>
      <svg role="img" aria-label="Scaled prediction variance against fraction of the design space" data-testid="fds-chart" width={box.width} height={box.height} viewBox={`0 0 ${box.width} ${box.height}`} style={{ maxWidth: '100%', height: 'auto' }}>
        <line x1={box.left} x2={box.width - box.right} y1={box.height - box.bottom} y2={box.height - box.bottom} stroke="#5b676e" />
        <line x1={box.left} x2={box.left} y1={box.top} y2={box.height - box.bottom} stroke="#5b676e" />
        {ticks(0, 1).map((t) => (
          <text key={`x${t}`} x={x(t)} y={box.height - box.bottom + 14} fontSize={10} textAnchor="middle">
            {t.toFixed(2)}
          </text>
        ))}
        {ticks(0, hi).map((t) => (
          <text key={`y${t}`} x={box.left - 4} y={y(t) + 3} fontSize={10} textAnchor="end">
            {t.toFixed(t < 10 ? 2 : 0)}
          </text>
        ))}
        <text x={(box.left + box.width - box.right) / 2} y={box.height - 4} fontSize={11} textAnchor="middle">
          fraction of design space
        </text>
        {series.map((s) => (
          <path key={s.name} d={linePath(s.fraction, s.variance, x, y)} fill="none" stroke={s.colour} strokeWidth={2} data-series={s.name} />
        ))}
      </svg>
      <figcaption style={{ fontSize: '0.8rem' }}>
        {series.map((s) => (
          <span key={s.name} style={{ marginRight: '1rem' }}>
            <span style={{ display: 'inline-block', width: 14, height: 3, background: s.colour, verticalAlign: 'middle', marginRight: 4 }} />
            {s.name}
          </span>
        ))}
        <span className="muted"> Lower and flatter is better: scaled prediction variance n·f(x)ᵀ(XᵀX)⁻¹f(x).</span>
      </figcaption>
    </figure>
  );
}
