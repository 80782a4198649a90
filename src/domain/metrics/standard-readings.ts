/**
 * A campaign's responses → the standard rig readings the plausibility checks know (apex height,
 * hops completed, distance travelled, energy drawn), by name and unit. Shared by the server and the
 * tablet, so both refuse the same entries.
 */
import type { TrialReadings } from './plausibility';

const LENGTH_TO_M: Record<string, number> = { m: 1, cm: 0.01, mm: 0.001 };
const ENERGY_TO_J: Record<string, number> = { J: 1, mJ: 0.001, uJ: 1e-6, 'µJ': 1e-6 };

export function standardReadings(
  responses: readonly { name: string; unit?: string }[],
  observations: Record<string, number>,
): { readings: TrialReadings; fieldOf: Partial<Record<keyof TrialReadings, string>> } {
  const readings: TrialReadings = {};
  const fieldOf: Partial<Record<keyof TrialReadings, string>> = {};
  for (const r of responses) {
    const v = observations[r.name];
    if (v === undefined) continue;
    const unit = r.unit ?? '';
    if (/apex|height/i.test(r.name) && LENGTH_TO_M[unit] !== undefined) {
      readings.apexHeightM = v * LENGTH_TO_M[unit]!;
      fieldOf.apexHeightM = r.name;
    } else if (/energy/i.test(r.name) && ENERGY_TO_J[unit] !== undefined) {
      readings.energyJ = v * ENERGY_TO_J[unit]!;
      fieldOf.energyJ = r.name;
    } else if (/distance|travel/i.test(r.name) && LENGTH_TO_M[unit] !== undefined) {
      readings.distanceM = v * LENGTH_TO_M[unit]!;
      fieldOf.distanceM = r.name;
    } else if (/hops/i.test(r.name)) {
      readings.hopsCompleted = v;
      fieldOf.hopsCompleted = r.name;
    }
  }
  return { readings, fieldOf };
}
