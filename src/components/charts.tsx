/**
 * Small SVG charts drawn from plain data (scales by d3-scale). Each chart has a title for screen
 * readers and prints as it shows.
 */
import { area as d3area, contours, line as d3line, scaleBand, scaleLinear, type ScaleLinear } from 'd3';

const W = 360;
const H = 220;
const M = { top: 14, right: 12, bottom: 38, left: 52 };

function ticks(scale: { ticks(n: number): number[] }, n = 5): number[] {
  return scale.ticks(n);
}

function fmt(v: number): string {
  return Math.abs(v) >= 1000 || (Math.abs(v) < 0.01 && v !== 0) ? v.toExponential(1) : Number(v.toPrecision(3)).toString();
}

function extent(values: number[], pad = 0.05): [number, number] {
  const finite = values.filter(Number.isFinite);
  if (finite.length === 0) return [0, 1];
  let lo = Math.min(...finite);
  let hi = Math.max(...finite);
  if (lo === hi) {
    lo -= 1;
    hi += 1;
  }
  const d = (hi - lo) * pad;
  return [lo - d, hi + d];
}

/** The x title under the plot and the y title turned along the left edge. */
function AxisTitles({ xLabel, yLabel }: { xLabel: string; yLabel: string }) {
  return (
    <>
      <text x={(M.left + W - M.right) / 2} y={H - 6} textAnchor="middle" fill="#1d2428">
        {xLabel}
      </text>
      <text transform={`translate(12 ${(M.top + H - M.bottom) / 2}) rotate(-90)`} textAnchor="middle" fill="#1d2428">
        {yLabel}
      </text>
    </>
  );
}

function Axes({ x, y, xLabel, yLabel }: { x: ScaleLinear<number, number>; y: ScaleLinear<number, number>; xLabel: string; yLabel: string }) {
  return (
    <g fontSize={10} fill="#5b676e">
      <line x1={M.left} x2={W - M.right} y1={H - M.bottom} y2={H - M.bottom} stroke="#aab4ba" />
      <line x1={M.left} x2={M.left} y1={M.top} y2={H - M.bottom} stroke="#aab4ba" />
      {ticks(x).map((t) => (
        <text key={`x${t}`} x={x(t)} y={H - M.bottom + 13} textAnchor="middle">
          {fmt(t)}
        </text>
      ))}
      {ticks(y).map((t) => (
        <g key={`y${t}`}>
          <line x1={M.left} x2={W - M.right} y1={y(t)} y2={y(t)} stroke="#eef1f2" />
          <text x={M.left - 4} y={y(t) + 3} textAnchor="end">
            {fmt(t)}
          </text>
        </g>
      ))}
      <AxisTitles xLabel={xLabel} yLabel={yLabel} />
    </g>
  );
}

export interface ScatterPoint {
  x: number;
  y: number;
  label?: string;
}

/** Points with optional reference line y = a + b x (e.g. a normal quantile plot or residuals at 0). */
export function ScatterPlot({ title, points, xLabel, yLabel, refLine }: { title: string; points: ScatterPoint[]; xLabel: string; yLabel: string; refLine?: { a: number; b: number } }) {
  const x = scaleLinear().domain(extent(points.map((p) => p.x))).range([M.left, W - M.right]).nice();
  const y = scaleLinear().domain(extent(points.map((p) => p.y))).range([H - M.bottom, M.top]).nice();
  const [x0, x1] = x.domain() as [number, number];
  return (
    <figure className="chart">
      <svg viewBox={`0 0 ${W} ${H}`} role="img" aria-label={title}>
        <title>{title}</title>
        <Axes x={x} y={y} xLabel={xLabel} yLabel={yLabel} />
        {refLine ? <line x1={x(x0)} x2={x(x1)} y1={y(refLine.a + refLine.b * x0)} y2={y(refLine.a + refLine.b * x1)} stroke="#c0392b" strokeDasharray="4 3" /> : null}
        {points.map((p, i) => (
          <g key={i}>
            <circle cx={x(p.x)} cy={y(p.y)} r={3.2} fill="#1f6f5c" fillOpacity={0.8} />
            {p.label ? (
              <text x={x(p.x) + 5} y={y(p.y) - 4} fontSize={9} fill="#1d2428">
                {p.label}
              </text>
            ) : null}
          </g>
        ))}
      </svg>
      <figcaption>{title}</figcaption>
    </figure>
  );
}

export interface BandPoint {
  x: number;
  mean: number;
  sd: number;
}

/** A curve with a ±2 sd band (a surrogate's slice, or a fitted slice with its interval). */
export function BandPlot({ title, points, xLabel, yLabel, marks = [] }: { title: string; points: BandPoint[]; xLabel: string; yLabel: string; marks?: ScatterPoint[] }) {
  const x = scaleLinear().domain(extent(points.map((p) => p.x), 0)).range([M.left, W - M.right]);
  const y = scaleLinear()
    .domain(extent([...points.flatMap((p) => [p.mean - 2 * p.sd, p.mean + 2 * p.sd]), ...marks.map((m) => m.y)]))
    .range([H - M.bottom, M.top])
    .nice();
  const band = d3area<BandPoint>()
    .x((p) => x(p.x))
    .y0((p) => y(p.mean - 2 * p.sd))
    .y1((p) => y(p.mean + 2 * p.sd));
  const mean = d3line<BandPoint>()
    .x((p) => x(p.x))
    .y((p) => y(p.mean));
  return (
    <figure className="chart">
      <svg viewBox={`0 0 ${W} ${H}`} role="img" aria-label={title}>
        <title>{title}</title>
        <Axes x={x} y={y} xLabel={xLabel} yLabel={yLabel} />
        <path d={band(points) ?? ''} fill="#1f6f5c" fillOpacity={0.15} />
        <path d={mean(points) ?? ''} fill="none" stroke="#1f6f5c" strokeWidth={2} />
        {marks.map((m, i) => (
          <circle key={i} cx={x(m.x)} cy={y(m.y)} r={4} fill="#c0392b" />
        ))}
      </svg>
      <figcaption>{title}</figcaption>
    </figure>
  );
}

export interface IntervalBar {
  label: string;
  value: number;
  lo?: number | null;
  hi?: number | null;
  highlight?: boolean;
}

/** Horizontal bars with interval whiskers, largest first: "what drives the response". */
export function IntervalBars({ title, bars, xLabel }: { title: string; bars: IntervalBar[]; xLabel: string }) {
  const h = Math.max(120, 22 * bars.length + 50);
  const values = bars.flatMap((b) => [b.value, b.lo ?? b.value, b.hi ?? b.value, 0]);
  const x = scaleLinear().domain(extent(values)).range([120, W - M.right]).nice();
  const y = scaleBand<string>()
    .domain(bars.map((b) => b.label))
    .range([M.top, h - 30])
    .padding(0.25);
  return (
    <figure className="chart">
      <svg viewBox={`0 0 ${W} ${h}`} role="img" aria-label={title}>
        <title>{title}</title>
        <line x1={x(0)} x2={x(0)} y1={M.top} y2={h - 30} stroke="#5b676e" />
        {x.ticks(5).map((t) => (
          <text key={t} x={x(t)} y={h - 16} fontSize={10} textAnchor="middle" fill="#5b676e">
            {fmt(t)}
          </text>
        ))}
        <text x={(120 + W - M.right) / 2} y={h - 3} fontSize={10} textAnchor="middle">
          {xLabel}
        </text>
        {bars.map((b) => {
          const yy = y(b.label)!;
          const bh = y.bandwidth();
          return (
            <g key={b.label}>
              <text x={116} y={yy + bh / 2 + 3} fontSize={10} textAnchor="end">
                {b.label}
              </text>
              <rect x={Math.min(x(0), x(b.value))} y={yy} width={Math.abs(x(b.value) - x(0))} height={bh} fill={b.highlight ? '#1f6f5c' : '#9bb8af'} />
              {b.lo != null && b.hi != null ? <line x1={x(b.lo)} x2={x(b.hi)} y1={yy + bh / 2} y2={yy + bh / 2} stroke="#1d2428" strokeWidth={1.5} /> : null}
            </g>
          );
        })}
      </svg>
      <figcaption>{title}</figcaption>
    </figure>
  );
}

/** Filled contours of a predicted surface over two factors, with the design points on top. */
export function ContourPlot({
  title,
  x: xs,
  y: ys,
  z,
  points,
  xLabel,
  yLabel,
}: {
  title: string;
  x: number[];
  y: number[];
  z: number[][];
  points: ScatterPoint[];
  xLabel: string;
  yLabel: string;
}) {
  const nx = xs.length;
  const ny = ys.length;
  const flat = z.flat();
  const x = scaleLinear().domain([xs[0]!, xs[nx - 1]!]).range([M.left, W - M.right]);
  const y = scaleLinear().domain([ys[0]!, ys[ny - 1]!]).range([H - M.bottom, M.top]);
  const [lo, hi] = extent(flat, 0);
  const levels = scaleLinear().domain([lo, hi]).ticks(9);
  const colour = scaleLinear<string>().domain([lo, hi]).range(['#e8f1ee', '#1f6f5c']);
  const bands = contours().size([nx, ny]).thresholds(levels)(flat);
  // Grid index (0.5 = centre of the first cell) → natural units.
  const gx = (i: number) => xs[0]! + ((Math.min(Math.max(i - 0.5, 0), nx - 1)) * (xs[nx - 1]! - xs[0]!)) / (nx - 1);
  const gy = (j: number) => ys[0]! + ((Math.min(Math.max(j - 0.5, 0), ny - 1)) * (ys[ny - 1]! - ys[0]!)) / (ny - 1);
  const pathOf = (mp: number[][][][]) =>
    mp
      .map((polygon) => polygon.map((ring) => 'M' + ring.map(([i, j]) => `${x(gx(i!)).toFixed(1)},${y(gy(j!)).toFixed(1)}`).join('L') + 'Z').join(''))
      .join('');
  return (
    <figure className="chart">
      <svg viewBox={`0 0 ${W} ${H}`} role="img" aria-label={title}>
        <title>{title}</title>
        {bands.map((b) => (
          <path key={b.value} d={pathOf(b.coordinates as unknown as number[][][][])} fill={colour(b.value)} stroke="#ffffff" strokeOpacity={0.6} strokeWidth={0.5}>
            <title>{`≥ ${fmt(b.value)}`}</title>
          </path>
        ))}
        <Axes x={x} y={y} xLabel={xLabel} yLabel={yLabel} />
        {points.map((p, i) => (
          <circle key={i} cx={x(p.x)} cy={y(p.y)} r={3.5} fill="#c0392b" stroke="#fff" />
        ))}
      </svg>
      <figcaption>
        {title}; contour steps {levels.length > 1 ? fmt(levels[1]! - levels[0]!) : '—'} from {fmt(lo)} (light) to {fmt(hi)} (dark); red dots: trials.
      </figcaption>
    </figure>
  );
}

/** Predicted response at the levels of one factor, one line per level of another. */
export function InteractionChart({ title, levelsA, lines, xLabel, yLabel }: { title: string; levelsA: (number | string)[]; lines: { levelB: number | string; predicted: number[] }[]; xLabel: string; yLabel: string }) {
  const x = scaleLinear().domain([0, Math.max(1, levelsA.length - 1)]).range([M.left + 20, W - M.right - 60]);
  const y = scaleLinear().domain(extent(lines.flatMap((l) => l.predicted))).range([H - M.bottom, M.top]).nice();
  const palette = ['#1f6f5c', '#c0392b', '#2d5aa8', '#b7791f', '#6b46c1'];
  return (
    <figure className="chart">
      <svg viewBox={`0 0 ${W} ${H}`} role="img" aria-label={title}>
        <title>{title}</title>
        <g fontSize={10} fill="#5b676e">
          <line x1={M.left} x2={W - M.right} y1={H - M.bottom} y2={H - M.bottom} stroke="#aab4ba" />
          <line x1={M.left} x2={M.left} y1={M.top} y2={H - M.bottom} stroke="#aab4ba" />
          {levelsA.map((l, i) => (
            <text key={i} x={x(i)} y={H - M.bottom + 13} textAnchor="middle">
              {typeof l === 'number' ? fmt(l) : l}
            </text>
          ))}
          {y.ticks(5).map((t) => (
            <text key={t} x={M.left - 4} y={y(t) + 3} textAnchor="end">
              {fmt(t)}
            </text>
          ))}
          <AxisTitles xLabel={xLabel} yLabel={yLabel} />
        </g>
        {lines.map((l, k) => (
          <g key={String(l.levelB)}>
            <polyline points={l.predicted.map((v, i) => `${x(i)},${y(v)}`).join(' ')} fill="none" stroke={palette[k % palette.length]} strokeWidth={2} />
            <text x={x(levelsA.length - 1) + 6} y={y(l.predicted[l.predicted.length - 1]!) + 3} fontSize={10} fill={palette[k % palette.length]}>
              {typeof l.levelB === 'number' ? fmt(l.levelB) : l.levelB}
            </text>
          </g>
        ))}
      </svg>
      <figcaption>{title}</figcaption>
    </figure>
  );
}

export interface PointGroup {
  label: string;
  values: number[];
}

/**
 * Values grouped by a label (e.g. residuals by whole plot or by rig): one column of points per group,
 * a short bar at each group's mean and a dashed line at zero.
 */
export function GroupedPoints({ title, groups, xLabel, yLabel }: { title: string; groups: PointGroup[]; xLabel: string; yLabel: string }) {
  const x = scaleBand<string>()
    .domain(groups.map((g) => g.label))
    .range([M.left, W - M.right])
    .padding(0.3);
  const y = scaleLinear().domain(extent([0, ...groups.flatMap((g) => g.values)])).range([H - M.bottom, M.top]).nice();
  const bw = x.bandwidth();
  // Label every group when they fit, else every k-th; long labels cut to the room each one has.
  const every = Math.max(1, Math.ceil(groups.length / 14));
  const room = Math.max(3, Math.floor((bw + x.step() * x.paddingInner() + (every - 1) * x.step()) / 6));
  return (
    <figure className="chart">
      <svg viewBox={`0 0 ${W} ${H}`} role="img" aria-label={title}>
        <title>{title}</title>
        <g fontSize={10} fill="#5b676e">
          <line x1={M.left} x2={W - M.right} y1={H - M.bottom} y2={H - M.bottom} stroke="#aab4ba" />
          <line x1={M.left} x2={M.left} y1={M.top} y2={H - M.bottom} stroke="#aab4ba" />
          {y.ticks(5).map((t) => (
            <g key={`y${t}`}>
              <line x1={M.left} x2={W - M.right} y1={y(t)} y2={y(t)} stroke="#eef1f2" />
              <text x={M.left - 4} y={y(t) + 3} textAnchor="end">
                {fmt(t)}
              </text>
            </g>
          ))}
          {groups.map((g, i) =>
            i % every === 0 ? (
              <text key={`x${g.label}`} x={x(g.label)! + bw / 2} y={H - M.bottom + 13} textAnchor="middle">
                {g.label.length > room ? `${g.label.slice(0, room - 1)}…` : g.label}
              </text>
            ) : null,
          )}
          <AxisTitles xLabel={xLabel} yLabel={yLabel} />
        </g>
        <line x1={M.left} x2={W - M.right} y1={y(0)} y2={y(0)} stroke="#c0392b" strokeDasharray="4 3" />
        {groups.map((g) => {
          const cx = x(g.label)! + bw / 2;
          const mean = g.values.reduce((s, v) => s + v, 0) / g.values.length;
          return (
            <g key={g.label}>
              {g.values.map((v, j) => (
                <circle key={j} cx={cx} cy={y(v)} r={3} fill="#1f6f5c" fillOpacity={0.7} />
              ))}
              <line x1={cx - Math.min(10, bw / 2)} x2={cx + Math.min(10, bw / 2)} y1={y(mean)} y2={y(mean)} stroke="#1d2428" strokeWidth={2} />
            </g>
          );
        })}
      </svg>
      <figcaption>{title}</figcaption>
    </figure>
  );
}
