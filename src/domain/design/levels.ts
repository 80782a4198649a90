/** Coded level sets of a factor, shared by the classical constructions and candidate sets. */
import { snapToAllowed, toCoded, toNatural, type Factor } from '../factors';

/**
 * Coded levels a factor takes in a factorial arrangement: continuous factors at the given coded
 * levels (±1, or −1, 0, +1 for a quadratic model), discrete factors at every allowed value,
 * categorical factors at every level index.
 */
export function codedLevels(f: Factor, continuousLevels: readonly number[]): number[] {
  if (f.kind === 'continuous') return continuousLevels.slice();
  if (f.kind === 'discrete') return f.values.slice().sort((a, b) => a - b).map((v) => toCoded(f, v));
  return f.levels.map((_, i) => i);
}

/** Coded centre value of a numeric factor (a discrete factor's allowed value nearest the middle). */
export function codedCentre(f: Factor): number {
  if (f.kind === 'continuous') return 0;
  if (f.kind === 'discrete') return toCoded(f, snapToAllowed(f.values, toNatural(f, 0)));
  return 0;
}

/** Standard (Yates) order: first factor varies fastest. */
export function standardOrder(levelLists: readonly (readonly number[])[]): number[][] {
  const k = levelLists.length;
  const sizes = levelLists.map((l) => l.length);
  const total = sizes.reduce((a, b) => a * b, 1);
  const rows: number[][] = [];
  for (let i = 0; i < total; i++) {
    const row = new Array<number>(k);
    let rest = i;
    for (let j = 0; j < k; j++) {
      row[j] = levelLists[j]![rest % sizes[j]!]!;
      rest = Math.floor(rest / sizes[j]!);
    }
    rows.push(row);
  }
  return rows;
}
