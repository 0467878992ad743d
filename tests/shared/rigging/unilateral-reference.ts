/**
 * An independent check on slackAwareLiftLineLoads: the batten as Euler-Bernoulli beam elements
 * (the 4×4 element stiffness matrix of the direct stiffness method, e.g. Logan, A First Course in the
 * Finite Element Method, beam element chapter; from memory), on lift lines that can pull but not push.
 * The one-way supports are the Signorini conditions: a taut line has zero deflection and pulls
 * (reaction ≥ 0), a slack line has no reaction and the batten at or above it (deflection ≥ 0). Rather
 * than iterating, this tries every set of taut lines, most lines first, and answers the first set that
 * meets them all: the enumeration of complementary bases of a linear complementarity problem
 * (Cottle, Pang & Stone, The Linear Complementarity Problem; from memory). The beam itself is solved by stiffness-reference.ts.
 */
import type { LiftLineLoadsInput } from '@shared/rigging';
import { solveBeamOnSupports } from './stiffness-reference';

/** kg on each lift line (0 on a slack one), or null when no set of taut lines can hold the batten. */
export function referenceSlackLoads(input: LiftLineLoadsInput): number[] | null {
  const lines = input.liftLinesM;
  const n = lines.length;
  const totalKg = input.selfMassKgPerM * input.lengthM + [...(input.pointLoads ?? []), ...(input.spreadLoads ?? [])].reduce((s, l) => s + l.massKg, 0);
  const forceTol = 1e-7 * totalKg;
  const sagTol = 1e-9 * totalKg * input.lengthM ** 3;
  const subsets: number[][] = [];
  for (let mask = 1; mask < 1 << n; mask++) {
    const taut = lines.map((_, i) => i).filter((i) => mask & (1 << i));
    if (taut.length >= 2) subsets.push(taut);
  }
  subsets.sort((a, b) => b.length - a.length);
  for (const taut of subsets) {
    const { reactionAt, deflectionAt } = solveBeamOnSupports(input, taut.map((i) => lines[i]));
    const loads = lines.map((x, i) => (taut.includes(i) ? reactionAt(x) : 0));
    if (loads.some((kg) => kg < -forceTol)) continue;
    if (lines.some((x, i) => !taut.includes(i) && deflectionAt(x) < -sagTol)) continue;
    return loads;
  }
  return null;
}
