/**
 * Where spreader plates go within a brick step. A plate goes on the stack each time it reaches a
 * multiple of the venue's spacing (24 in by default, common practice): the plate count of a stack is
 * floor(stack height / spacing), as `spreaderPlatesDue` counts it. Plate thickness is not counted.
 *
 * Within a step the bricks go in the order of the venue's brick types (all of the first type, then the
 * next). Unloading takes them off in the same order from the top, and a plate comes off just before
 * the brick it rests on.
 */
import { spreaderPlatesDue } from './check';
import type { BrickCounts, BrickType } from './types';

/** The heights of the step's bricks in the order they are handled, or null when one is unknown. */
function brickHeightsM(bricks: BrickCounts, brickTypes: BrickType[]): number[] | null {
  const heights: number[] = [];
  for (const b of brickTypes) {
    const count = bricks[b.type] ?? 0;
    if (count <= 0) continue;
    if (!b.heightM) return null;
    for (let i = 0; i < count; i++) heights.push(b.heightM);
  }
  // A brick of a type the venue does not list has no known height.
  const listed = brickTypes.reduce((sum, b) => sum + Math.max(0, bricks[b.type] ?? 0), 0);
  const total = Object.values(bricks).reduce((sum, n) => sum + Math.max(0, n), 0);
  return listed === total ? heights : null;
}

/** Stack height of the bricks on an arbor, or null when a brick on it has no known height. */
export function stackHeightM(bricks: BrickCounts, brickTypes: BrickType[]): number | null {
  const heights = brickHeightsM(bricks, brickTypes);
  return heights && heights.reduce((sum, h) => sum + h, 0);
}

/**
 * Counts within a brick step after which a spreader plate goes on (loading) or comes off (unloading):
 * loading 45 bricks of 2 in onto an empty arbor with plates every 24 in gives [12, 24, 36]. A count of 0
 * on an unloading step means a plate comes off before the first brick. Null when a brick height is
 * unknown (the plan then says nothing of plates and the capacity check keeps its reminder).
 */
export function spreaderPlatesAt(
  kind: 'add-bricks' | 'remove-bricks',
  arborBricks: BrickCounts,
  stepBricks: BrickCounts,
  brickTypes: BrickType[],
  spacingM: number,
): number[] | null {
  const startM = stackHeightM(arborBricks, brickTypes);
  const heights = brickHeightsM(stepBricks, brickTypes);
  if (startM === null || heights === null || !(spacingM > 0)) return null;
  const at: number[] = [];
  let heightM = startM;
  heights.forEach((h, i) => {
    const before = spreaderPlatesDue(heightM, spacingM);
    heightM = kind === 'add-bricks' ? heightM + h : Math.max(0, heightM - h);
    const after = spreaderPlatesDue(heightM, spacingM);
    // Loading: the plate goes on after this brick (the i+1th). Unloading: it comes off before it.
    const count = kind === 'add-bricks' ? i + 1 : i;
    for (let k = 0; k < Math.abs(after - before); k++) at.push(count);
  });
  return at;
}

/** One run of a brick step between spreader plates: the bricks in it, by type. */
export interface BrickRun {
  bricks: BrickCounts;
  /** A spreader plate goes on (or comes off) after this run. */
  plateAfter: boolean;
}

/**
 * A brick step cut at its spreader plates, in the order the bricks are handled:
 * 45 bricks with plates at [24] give 24 bricks, a plate, then 21 bricks. Runs may be empty (a plate
 * taken off before the first brick is pulled). Without plates, one run holding the whole step.
 */
export function brickRuns(bricks: BrickCounts, brickTypes: BrickType[], platesAt: number[] = []): BrickRun[] {
  const order = [
    ...brickTypes.map((b) => b.type).filter((t) => (bricks[t] ?? 0) > 0),
    ...Object.keys(bricks).filter((t) => (bricks[t] ?? 0) > 0 && !brickTypes.some((b) => b.type === t)),
  ];
  const sequence = order.flatMap((t) => Array<string>(bricks[t]).fill(t));
  const cuts = [...platesAt].sort((a, b) => a - b);
  const runs: BrickRun[] = [];
  let from = 0;
  for (const cut of cuts) {
    runs.push({ bricks: countOf(sequence.slice(from, cut)), plateAfter: true });
    from = Math.max(from, cut);
  }
  if (from < sequence.length || runs.length === 0) runs.push({ bricks: countOf(sequence.slice(from)), plateAfter: false });
  return runs;
}

function countOf(types: string[]): BrickCounts {
  const counts: BrickCounts = {};
  for (const t of types) counts[t] = (counts[t] ?? 0) + 1;
  return counts;
}
