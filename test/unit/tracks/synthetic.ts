/**
 * Synthetic hopping tracks with known parameters: stance at a ground level, ballistic flights under
 * standard gravity, uneven sampling, Gaussian noise and dropouts. An invented scenario for tests.
 */
import { randomNormal, seededRandom } from '@/domain/random';

export interface SyntheticHop {
  apexHeight: number;
  /** Horizontal velocity in flight, m/s. */
  vx: number;
  vy: number;
  /** Stance before this hop, s. */
  stanceBefore: number;
}

export interface SyntheticOptions {
  hops: SyntheticHop[];
  ground?: number;
  finalStance?: number;
  sampleRate?: number;
  /** Relative jitter of the sampling interval (0 = even). */
  jitter?: number;
  noise?: number;
  /** Probability that a row has a blank cell. */
  dropout?: number;
  seed?: number;
  gravity?: number;
  /** Unit scale for output: 1000 writes mm / ms. */
  lengthScale?: number;
  timeScale?: number;
  start?: { x: number; y: number; t: number };
  /** Depth of a half-sine dip of the marker during each stance (leg compression), m. */
  stanceDip?: number;
  /** Ground inclined along x: the ground height rises by this much per metre of x (a tilted plate). */
  slopeX?: number;
  /** Probability that a sample is a marker glitch: height off by +5 cm. */
  spikes?: number;
}

export interface TrueHop {
  takeoffTime: number;
  landingTime: number;
  apexHeight: number;
  hopLength: number;
  takeoffSpeed: number;
  takeoffAngleDeg: number;
  landingX: number;
  landingY: number;
}

export interface SyntheticTrack {
  csv: string;
  truth: TrueHop[];
  t: number[];
  x: number[];
  y: number[];
  z: number[];
}

export function syntheticTrack(o: SyntheticOptions): SyntheticTrack {
  const g = o.gravity ?? 9.80665;
  const ground = o.ground ?? 0.012;
  const rng = seededRandom(o.seed ?? 1);
  const start = o.start ?? { x: 0.1, y: 0.2, t: 0 };
  // Piecewise description.
  interface Piece { t0: number; t1: number; x0: number; y0: number; vx: number; vy: number; vz: number; flight: boolean }
  const pieces: Piece[] = [];
  const truth: TrueHop[] = [];
  let t = start.t;
  let x = start.x;
  let y = start.y;
  for (const hop of o.hops) {
    pieces.push({ t0: t, t1: t + hop.stanceBefore, x0: x, y0: y, vx: 0, vy: 0, vz: 0, flight: false });
    t += hop.stanceBefore;
    const vz = Math.sqrt(2 * g * hop.apexHeight);
    // On an inclined ground the landing point is higher or lower: z returns to the ground under x.
    const slope = o.slopeX ?? 0;
    const T = (2 * (vz - slope * hop.vx)) / g;
    pieces.push({ t0: t, t1: t + T, x0: x, y0: y, vx: hop.vx, vy: hop.vy, vz, flight: true });
    const lx = x + hop.vx * T;
    const ly = y + hop.vy * T;
    const vh = Math.hypot(hop.vx, hop.vy);
    truth.push({
      takeoffTime: t, landingTime: t + T, apexHeight: hop.apexHeight, hopLength: vh * T,
      takeoffSpeed: Math.hypot(vh, vz), takeoffAngleDeg: (Math.atan2(vz, vh) * 180) / Math.PI, landingX: lx, landingY: ly,
    });
    t += T;
    x = lx;
    y = ly;
  }
  const finalStance = o.finalStance ?? 0.3;
  pieces.push({ t0: t, t1: t + finalStance, x0: x, y0: y, vx: 0, vy: 0, vz: 0, flight: false });
  const end = t + finalStance;

  const dt = 1 / (o.sampleRate ?? 500);
  const jitter = o.jitter ?? 0;
  const noise = o.noise ?? 0;
  const ls = o.lengthScale ?? 1;
  const ts = o.timeScale ?? 1;
  const out = { t: [] as number[], x: [] as number[], y: [] as number[], z: [] as number[] };
  const lines = ['time,pos_x,pos_y,pos_z'];
  let p = 0;
  for (let s = start.t; s <= end; s += dt * (1 + jitter * (2 * rng.next() - 1))) {
    while (p < pieces.length - 1 && s >= pieces[p]!.t1) p++;
    const piece = pieces[p]!;
    const tau = s - piece.t0;
    let px = piece.x0 + piece.vx * tau;
    let py = piece.y0 + piece.vy * tau;
    let pz = ground + (o.slopeX ?? 0) * piece.x0 + (piece.flight ? piece.vz * tau - 0.5 * g * tau * tau : 0);
    if (!piece.flight && o.stanceDip) pz -= o.stanceDip * Math.sin((Math.PI * tau) / (piece.t1 - piece.t0));
    if (o.spikes && rng.next() < o.spikes) pz += 0.05;
    if (noise > 0) {
      px += noise * randomNormal(rng);
      py += noise * randomNormal(rng);
      pz += noise * randomNormal(rng);
    }
    out.t.push(s); out.x.push(px); out.y.push(py); out.z.push(pz);
    const cells = [(s * ts).toFixed(6), (px * ls).toFixed(6), (py * ls).toFixed(6), (pz * ls).toFixed(6)];
    if (o.dropout && rng.next() < o.dropout) cells[1 + Math.floor(rng.next() * 3)] = rng.next() < 0.5 ? '' : 'NaN';
    lines.push(cells.join(','));
  }
  return { csv: lines.join('\n') + '\n', truth, ...out };
}
