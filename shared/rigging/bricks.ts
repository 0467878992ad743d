/**
 * Choosing counterweight bricks: exact searches, not greedy. A greedy pick (heaviest first) misses
 * answers such as 3 + 3 + 3 for 9 kg from 3 kg and 5 kg bricks, and the crew would then carry the difference.
 */
import type { BrickCounts } from './types';

/** Bricks of one type available to a search: on the loading bridge, or on the arbor. */
export interface BrickStock {
  type: string;
  massKg: number;
  count: number;
}

/** What a search picked: counts by type (only types picked) and their total mass. */
export interface BrickPick {
  picks: BrickCounts;
  totalKg: number;
}

/**
 * Totals within a microgram are the same total: brick masses converted from pounds are not exact in binary,
 * and three half-bricks must tie with one-and-a-half full bricks.
 */
export const MASS_TOLERANCE_KG = 1e-9;
const EPS = MASS_TOLERANCE_KG;

interface Prepared {
  items: BrickStock[];
  /** suffixKg[i] = mass of every brick of items[i..]. */
  suffixKg: number[];
}

function prepare(stock: BrickStock[]): Prepared {
  for (const s of stock) {
    if (!Number.isInteger(s.count) || s.count < 0) throw new RangeError(`Brick count for "${s.type}" must be a whole number, not ${s.count}.`);
    if (!(s.massKg > 0) || !Number.isFinite(s.massKg)) throw new RangeError(`Brick type "${s.type}" needs a positive mass.`);
  }
  // Heaviest first: the first answer found uses few bricks, so the brick-count bound prunes early.
  const items = stock.filter((s) => s.count > 0).sort((a, b) => b.massKg - a.massKg);
  const suffixKg = new Array<number>(items.length + 1).fill(0);
  for (let i = items.length - 1; i >= 0; i--) suffixKg[i] = suffixKg[i + 1] + items[i].massKg * items[i].count;
  return { items, suffixKg };
}

/**
 * Remembers each (type reached, total so far) with the fewest bricks it was reached with. Reaching it again
 * with no fewer bricks cannot lead anywhere better, so that branch is skipped. Venues' bricks are multiples of
 * a common unit (full, half, quarter), so totals repeat often and this turns the search into a small table.
 */
function memo(n: number): (i: number, kg: number, bricks: number) => boolean {
  const levels = Array.from({ length: n + 1 }, () => new Map<number, number>());
  return (i, kg, bricks) => {
    const key = Math.round(kg / EPS);
    const before = levels[i].get(key);
    if (before !== undefined && before <= bricks) return true;
    levels[i].set(key, bricks);
    return false;
  };
}

function toPick(items: BrickStock[], counts: number[], totalKg: number): BrickPick {
  const picks: BrickCounts = {};
  items.forEach((item, i) => {
    if (counts[i] > 0) picks[item.type] = (picks[item.type] ?? 0) + counts[i];
  });
  return { picks, totalKg };
}

/**
 * The bricks whose total comes closest to `targetKg` without exceeding it (so the set stays pipe-heavy),
 * never more of a type than its count; among equal totals, the fewest bricks.
 */
export function chooseBricks(targetKg: number, stock: BrickStock[]): BrickPick {
  const { items, suffixKg } = prepare(stock);
  const n = items.length;
  const counts = new Array<number>(n).fill(0);
  let bestKg = 0;
  let bestBricks = 0;
  let bestCounts = counts.slice();
  if (!(targetKg > 0) || n === 0) return { picks: {}, totalKg: 0 };

  const seen = memo(n);
  const visit = (i: number, kg: number, bricks: number): void => {
    if (seen(i, kg, bricks)) return;
    const reachableKg = Math.min(targetKg, kg + suffixKg[i]);
    if (reachableKg < bestKg - EPS) return;
    if (reachableKg <= bestKg + EPS && i < n) {
      // Can only tie the best: worth going on only if it can be done with fewer bricks.
      const fewestMore = Math.max(0, Math.ceil((bestKg - kg - EPS) / items[i].massKg));
      if (bricks + fewestMore >= bestBricks) return;
    }
    if (i === n) {
      if (kg > bestKg + EPS || (kg >= bestKg - EPS && bricks < bestBricks)) {
        bestKg = kg;
        bestBricks = bricks;
        bestCounts = counts.slice();
      }
      return;
    }
    const item = items[i];
    const most = Math.min(item.count, Math.floor((targetKg - kg + EPS) / item.massKg));
    for (let c = most; c >= 0; c--) {
      counts[i] = c;
      visit(i + 1, kg + c * item.massKg, bricks + c);
    }
    counts[i] = 0;
  };
  visit(0, 0, 0);
  return toPick(items, bestCounts, bestKg);
}

/**
 * The bricks to pull so their total is at least `minKg`, with as little over as the bricks allow;
 * among equal totals, the fewest bricks. `null` when all of `stock` together is short of `minKg`.
 */
export function chooseBricksAtLeast(minKg: number, stock: BrickStock[]): BrickPick | null {
  const { items, suffixKg } = prepare(stock);
  const n = items.length;
  if (!(minKg > EPS)) return { picks: {}, totalKg: 0 };
  if (suffixKg[0] < minKg - EPS) return null;
  const counts = new Array<number>(n).fill(0);
  let bestKg = Infinity;
  let bestBricks = Infinity;
  let bestCounts = counts.slice();

  const seen = memo(n);
  const visit = (i: number, kg: number, bricks: number): void => {
    if (seen(i, kg, bricks)) return;
    if (kg >= minKg - EPS) {
      // Enough: any further brick only adds weight.
      if (kg < bestKg - EPS || (kg <= bestKg + EPS && bricks < bestBricks)) {
        bestKg = kg;
        bestBricks = bricks;
        bestCounts = counts.slice();
      }
      return;
    }
    if (i === n || kg + suffixKg[i] < minKg - EPS) return;
    if (minKg > bestKg + EPS) return;
    const item = items[i];
    const fewestMore = Math.ceil((minKg - kg - EPS) / item.massKg);
    if (minKg >= bestKg - EPS && bricks + fewestMore >= bestBricks) return;
    // More of this type than reaches minKg on its own would only be over.
    const most = Math.min(item.count, fewestMore);
    for (let c = most; c >= 0; c--) {
      counts[i] = c;
      visit(i + 1, kg + c * item.massKg, bricks + c);
    }
    counts[i] = 0;
  };
  visit(0, 0, 0);
  return toPick(items, bestCounts, bestKg);
}
