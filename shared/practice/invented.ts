/**
 * Invented line sets to practise on, made from a seed: a spare pipe balanced on its arbor with a piece
 * or two to hang, or a set carrying pieces to take off. Planned with the real planner, so the drill's
 * steps are the ones a real session would hold.
 */
import { lbToKg, planChange, type BrickType, type Piece, type PlanInput } from '../rigging';
import type { LineSetInput } from '../protocol/session';
import { seededRandom } from './random';

/** The demo venue's two brick types: 20 lb full and 10 lb half bricks (common practice sizes). */
const BRICK_TYPES: BrickType[] = [
  { type: 'full', massKg: lbToKg(20) },
  { type: 'half', massKg: lbToKg(10) },
];
const PIECES = ['Practice border', 'Practice drop', 'Practice leg pair', 'Practice ground row'];

/** A made-up line set and its plan. Weights in whole 5 lb, so a drill reads like a real hang. */
export function inventedLineSet(seed: number, ropeLockLimitKg = lbToKg(50)): LineSetInput {
  const random = seededRandom(seed);
  const lb = (min: number, max: number) => 5 * Math.round((min + random.next() * (max - min)) / 5);
  const unloading = random.next() < 0.5;
  const count = random.next() < 0.6 ? 1 : 2;
  const pieces: Piece[] = Array.from({ length: count }, (_, i) => ({ id: `practice-${i + 1}`, massKg: lbToKg(lb(30, 110)) }));
  const names = Object.fromEntries(pieces.map((p, i) => [p.id, PIECES[(Math.abs(seed) + i) % PIECES.length]]));
  const arborKg = lbToKg(80);
  const emptyBricks = 3;
  const pipeKg = arborKg + emptyBricks * BRICK_TYPES[0].massKg;
  // Unloading starts from a set already carrying the pieces and the bricks that balance them.
  const start: PlanInput = {
    purchase: 1,
    pipeKg,
    arborKg,
    pieces: [],
    bricks: { full: emptyBricks },
    brickTypes: BRICK_TYPES,
    bridgeStock: { full: 40, half: 20 },
    remove: [],
    add: pieces,
    ropeLockLimitKg,
    units: 'imperial',
  };
  const loaded = planChange(start).final;
  const input: PlanInput = unloading
    ? { ...start, pieces: loaded.pieces, bricks: loaded.bricks, bridgeStock: loaded.bridgeStock, remove: pieces.map((p) => p.id), add: [] }
    : start;
  const plan = planChange(input);
  const number = 90 + Math.floor(random.next() * 9);
  return {
    id: `practice-${number}`,
    name: `Practice line set ${number}`,
    steps: plan.steps,
    load: { purchase: input.purchase, pipeKg: input.pipeKg, arborKg: input.arborKg, pieces: input.pieces, bricks: input.bricks },
    brickTypes: BRICK_TYPES,
    ropeLockLimitKg,
    pieceNames: names,
  };
}
