/**
 * Applying one plan step to a line set, and reading the balance it leaves.
 * The session state machine replays confirmed steps through these, so they stay pure and strict.
 */
import type { BrickCounts, BrickType, LineSetLoad, PlanStep } from './types';

/** Total mass of counted bricks, in kg. Throws on a brick type the venue has not defined. */
export function bricksMassKg(bricks: BrickCounts, brickTypes: BrickType[]): number {
  let totalKg = 0;
  for (const [type, count] of Object.entries(bricks)) {
    if (!count) continue;
    const brick = brickTypes.find((b) => b.type === type);
    if (!brick) throw new Error(`Unknown brick type "${type}".`);
    totalKg += brick.massKg * count;
  }
  return totalKg;
}

/**
 * Imbalance of a line set in kg, judged at the batten: batten side − arbor side ÷ purchase.
 * Batten side = pipe + pieces; arbor side = empty arbor + bricks. Positive = pipe-heavy.
 */
export function loadImbalanceKg(load: LineSetLoad, brickTypes: BrickType[]): number {
  const battenSideKg = load.pipeKg + load.pieces.reduce((sum, p) => sum + p.massKg, 0);
  const arborSideKg = load.arborKg + bricksMassKg(load.bricks, brickTypes);
  return battenSideKg - arborSideKg / load.purchase;
}

function checkCounts(bricks: BrickCounts | undefined, kind: string): BrickCounts {
  if (!bricks) throw new Error(`A ${kind} step needs the bricks it moves.`);
  for (const [type, count] of Object.entries(bricks)) {
    if (!Number.isInteger(count) || count < 0) {
      throw new Error(`A ${kind} step has an invalid count of "${type}" bricks: ${count}.`);
    }
  }
  return bricks;
}

/**
 * The line set after one step, as a new object (the input is not changed).
 * Throws a plain-words Error when the step cannot happen on this set:
 * bricks that are not on the arbor, a piece that is not on the batten, a piece hung twice.
 */
export function applyStep(load: LineSetLoad, step: PlanStep, brickTypes: BrickType[]): LineSetLoad {
  const next: LineSetLoad = { ...load, pieces: [...load.pieces], bricks: { ...load.bricks } };
  switch (step.kind) {
    case 'remove-bricks': {
      for (const [type, count] of Object.entries(checkCounts(step.bricks, step.kind))) {
        if (!count) continue;
        const onArbor = next.bricks[type] ?? 0;
        if (onArbor < count) {
          throw new Error(`Cannot remove ${count} "${type}" bricks: only ${onArbor} on the arbor.`);
        }
        next.bricks[type] = onArbor - count;
      }
      return next;
    }
    case 'add-bricks': {
      for (const [type, count] of Object.entries(checkCounts(step.bricks, step.kind))) {
        if (!count) continue;
        if (!brickTypes.some((b) => b.type === type)) throw new Error(`Unknown brick type "${type}".`);
        next.bricks[type] = (next.bricks[type] ?? 0) + count;
      }
      return next;
    }
    case 'remove-piece': {
      const index = next.pieces.findIndex((p) => p.id === step.pieceId);
      if (index < 0) throw new Error(`Cannot remove piece "${step.pieceId}": it is not on the batten.`);
      next.pieces.splice(index, 1);
      return next;
    }
    case 'add-piece': {
      if (step.pieceId === undefined) throw new Error('An add-piece step needs the piece id.');
      if (step.massKg === undefined || !Number.isFinite(step.massKg) || step.massKg < 0) {
        throw new Error(`An add-piece step for "${step.pieceId}" needs the piece's mass.`);
      }
      if (next.pieces.some((p) => p.id === step.pieceId)) {
        throw new Error(`Piece "${step.pieceId}" is already on the batten.`);
      }
      next.pieces.push({ id: step.pieceId, massKg: step.massKg });
      return next;
    }
    case 'tie-off':
    case 'untie':
    case 'test-balance':
      return next;
    default: {
      const unknown: never = step.kind;
      throw new Error(`Unknown step kind "${String(unknown)}".`);
    }
  }
}
