/**
 * An independent check on liftLineLoads: a finite-element stiffness assembly of Euler-Bernoulli beam
 * elements (constant EI), supports as fixed vertical degrees of freedom, solved with mathjs.
 * Tests only: shared/ does not depend on mathjs.
 */
import { lusolve } from 'mathjs';
import type { LiftLineLoadsInput } from '@shared/rigging';

/** Reactions (kg, upward) at `supportsM` and the deflection (upward, EI = 1) at every node. */
export function solveBeamOnSupports(input: LiftLineLoadsInput, supportsM: number[]) {
  const { lengthM, liftLinesM, selfMassKgPerM, pointLoads = [], spreadLoads = [] } = input;
  const cuts = new Set<number>([0, lengthM, ...liftLinesM, ...pointLoads.map((p) => p.atM)]);
  for (const s of spreadLoads) cuts.add(s.fromM).add(s.toM);
  const nodes = [...cuts].sort((a, b) => a - b);
  const nodeAt = (x: number) => nodes.indexOf(x);
  const dof = nodes.length * 2;
  const K = Array.from({ length: dof }, () => new Array<number>(dof).fill(0));
  const F = new Array<number>(dof).fill(0);
  for (let e = 0; e + 1 < nodes.length; e++) {
    const h = nodes[e + 1] - nodes[e];
    const k = [
      [12, 6 * h, -12, 6 * h],
      [6 * h, 4 * h * h, -6 * h, 2 * h * h],
      [-12, -6 * h, 12, -6 * h],
      [6 * h, 2 * h * h, -6 * h, 4 * h * h],
    ].map((row) => row.map((v) => v / h ** 3));
    const at = [2 * e, 2 * e + 1, 2 * e + 2, 2 * e + 3];
    for (let r = 0; r < 4; r++) for (let c = 0; c < 4; c++) K[at[r]][at[c]] += k[r][c];
    const mid = (nodes[e] + nodes[e + 1]) / 2;
    let w = selfMassKgPerM;
    for (const s of spreadLoads) if (s.toM > s.fromM && mid > s.fromM && mid < s.toM) w += s.massKg / (s.toM - s.fromM);
    F[at[0]] -= (w * h) / 2;
    F[at[1]] -= (w * h * h) / 12;
    F[at[2]] -= (w * h) / 2;
    F[at[3]] += (w * h * h) / 12;
  }
  for (const p of pointLoads) F[2 * nodeAt(p.atM)] -= p.massKg;
  for (const s of spreadLoads) if (s.toM === s.fromM) F[2 * nodeAt(s.fromM)] -= s.massKg;
  const fixed = new Set(supportsM.map((x) => 2 * nodeAt(x)));
  const free = [...Array(dof).keys()].filter((i) => !fixed.has(i));
  const uf = lusolve(free.map((r) => free.map((c) => K[r][c])), free.map((r) => [F[r]])) as number[][];
  const u = new Array<number>(dof).fill(0);
  free.forEach((r, i) => (u[r] = uf[i][0]));
  return {
    reactionAt: (x: number) => K[2 * nodeAt(x)].reduce((sum, v, c) => sum + v * u[c], 0) - F[2 * nodeAt(x)],
    deflectionAt: (x: number) => u[2 * nodeAt(x)],
  };
}

/** kg on each lift line of a rigid continuous beam: every line a fixed support. */
export function referenceLiftLineLoads(input: LiftLineLoadsInput): number[] {
  const { reactionAt } = solveBeamOnSupports(input, input.liftLinesM);
  return input.liftLinesM.map(reactionAt);
}
