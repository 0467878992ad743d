/**
 * Planning a change of load on a line set, step by step, so the set is never arbor-heavy.
 *
 * Rules (order of operations: stage rigging handbooks and school crew guides; common practice):
 * - Removals first, then additions, piece by piece in the order asked.
 * - Unloading a piece: its bricks come off the arbor, then the piece comes off the batten.
 * - Loading a piece: the piece goes on the batten, then its bricks go on the arbor.
 * - "Out of balance" is the imbalance after every step, including the moment between a brick step
 *   and its piece step (the set is then pipe-heavy by about that piece). If the start or any step is
 *   beyond the rope lock limit, the set is tied off before the first brick or piece step and untied
 *   after the last one; otherwise the rope lock holds it and there is no tie-off.
 * - The plan ends with a balance test.
 */
import { applyStep, bricksMassKg, loadImbalanceKg } from './apply';
import { chooseBricks, chooseBricksAtLeast, MASS_TOLERANCE_KG, type BrickStock } from './bricks';
import { planInputErrors } from './plan-validate';
import { spreaderPlatesAt } from './spreader';
import type { BrickCounts, BrickType, LineSetLoad, PlanInput, PlanResult, PlanStep, PlanWarning } from './types';
import { formatMass } from './units';

const EPS = MASS_TOLERANCE_KG;

/**
 * Balances are reckoned to the milligram: reported values are rounded to it, and the searches may miss
 * their target by under half of it. Without that, float noise (a piece of 1e-9 kg) could pull a whole brick.
 * Loading has more slack than unloading, so a brick pulled for a sub-milligram need always fits back on.
 */
const PULL_SLACK_KG = 2e-7;
const SLACK_KG = 4e-7;

/** Rounds to the milligram, so float noise never shows as "arbor-heavy by 0.0000001". */
function tidyKg(kg: number): number {
  return Math.round(kg * 1e6) / 1e6 + 0;
}

function stockOf(counts: BrickCounts, brickTypes: BrickType[]): BrickStock[] {
  return brickTypes.map((b) => ({ type: b.type, massKg: b.massKg, count: counts[b.type] ?? 0 }));
}

function addCounts(into: BrickCounts, counts: BrickCounts, sign: 1 | -1): BrickCounts {
  const next = { ...into };
  for (const [type, count] of Object.entries(counts)) next[type] = (next[type] ?? 0) + sign * count;
  return next;
}

const isEmpty = (counts: BrickCounts) => Object.values(counts).every((c) => !c);

/** The plan as it is built: the load after the last step, the bridge stock, and the steps so far. */
class PlanBuilder {
  load: LineSetLoad;
  bridge: BrickCounts;
  readonly steps: PlanStep[] = [];

  constructor(input: PlanInput, private readonly brickTypes: BrickType[], private readonly spreaderSpacingM?: number) {
    this.load = {
      purchase: input.purchase,
      pipeKg: input.pipeKg,
      arborKg: input.arborKg,
      pieces: [...input.pieces],
      bricks: { ...input.bricks },
    };
    this.bridge = { ...input.bridgeStock };
  }

  imbalanceKg(): number {
    return loadImbalanceKg(this.load, this.brickTypes);
  }

  arborSideKg(): number {
    return this.load.arborKg + bricksMassKg(this.load.bricks, this.brickTypes);
  }

  push(step: Omit<PlanStep, 'imbalanceAfterKg'>): void {
    const full: PlanStep = { ...step, imbalanceAfterKg: 0 };
    if ((step.kind === 'add-bricks' || step.kind === 'remove-bricks') && step.bricks && this.spreaderSpacingM !== undefined) {
      const at = spreaderPlatesAt(step.kind, this.load.bricks, step.bricks, this.brickTypes, this.spreaderSpacingM);
      if (at?.length) full.spreaderPlatesAt = at;
    }
    this.load = applyStep(this.load, full, this.brickTypes);
    full.imbalanceAfterKg = tidyKg(this.imbalanceKg());
    this.steps.push(full);
    // Bricks pulled from the arbor land on the loading bridge, where they can be loaded again.
    if (step.kind === 'remove-bricks' && step.bricks) this.bridge = addCounts(this.bridge, step.bricks, 1);
    if (step.kind === 'add-bricks' && step.bricks) this.bridge = addCounts(this.bridge, step.bricks, -1);
  }
}

/**
 * Loads bricks from the bridge that come closest to leaving the set balanced without passing it,
 * within what the arbor can still carry. Returns whether the arbor's capacity cut the pick short.
 */
function loadTowardBalance(plan: PlanBuilder, brickTypes: BrickType[], capacityKg: number | undefined, pieceId?: string): boolean {
  const wantedKg = plan.imbalanceKg() * plan.load.purchase;
  const roomKg = capacityKg === undefined ? Infinity : capacityKg - plan.arborSideKg();
  const targetKg = Math.min(wantedKg, roomKg) + SLACK_KG;
  const pick = chooseBricks(targetKg, stockOf(plan.bridge, brickTypes));
  if (!isEmpty(pick.picks)) plan.push({ kind: 'add-bricks', pieceId, bricks: pick.picks });
  return roomKg < wantedKg - SLACK_KG;
}

function refuse(input: PlanInput, warnings: PlanWarning[]): PlanResult {
  const final: PlanInput = {
    ...input,
    pieces: [...input.pieces],
    bricks: { ...input.bricks },
    bridgeStock: { ...input.bridgeStock },
  };
  return { steps: [], final, warnings };
}

/**
 * A step-by-step plan for taking `remove` off and hanging `add` on a line set, with the balance after
 * each step. Any warning of severity `error` comes with no steps: the request cannot be done safely
 * as asked (arbor-heavy start, missing piece, too few bricks on the arbor or the bridge, arbor full).
 */
export function planChange(input: PlanInput): PlanResult {
  const units = input.units ?? 'metric';
  const show = (kg: number) => formatMass(kg, units);
  const invalid = planInputErrors(input);
  if (invalid.length) return refuse(input, invalid);

  const { brickTypes, purchase, ropeLockLimitKg, arborCapacityKg } = input;
  const plan = new PlanBuilder(input, brickTypes, input.spreaderSpacingM);
  const warnings: PlanWarning[] = [];
  const error = (code: string, message: string) => refuse(input, [...warnings, { severity: 'error', code, message }]);

  const startKg = plan.imbalanceKg();
  if (startKg < -EPS) {
    return error(
      'arbor-heavy',
      `The set is arbor-heavy by ${show(-startKg)} at the start. Do not load or unload: make it safe with a qualified rigger first.`,
    );
  }
  if (arborCapacityKg !== undefined && plan.arborSideKg() > arborCapacityKg + EPS) {
    warnings.push({
      severity: 'warning',
      code: 'arbor-over-capacity',
      message: `The arbor already carries ${show(plan.arborSideKg())}, more than its capacity of ${show(arborCapacityKg)}. Check with a qualified rigger.`,
    });
  }

  for (const id of input.remove) {
    const piece = plan.load.pieces.find((p) => p.id === id)!;
    // Pull enough that the piece can come off without the set going arbor-heavy; any pipe-heavy margin already there counts.
    const needKg = (piece.massKg - plan.imbalanceKg()) * purchase;
    const pick = chooseBricksAtLeast(needKg - PULL_SLACK_KG, stockOf(plan.load.bricks, brickTypes));
    if (!pick) {
      return error(
        'not-enough-bricks-on-arbor',
        `Taking off "${id}" needs ${show(needKg)} of bricks off the arbor first, and the arbor does not hold that much. ` +
          'The empty arbor would outweigh the batten: check with a qualified rigger.',
      );
    }
    if (!isEmpty(pick.picks)) plan.push({ kind: 'remove-bricks', pieceId: id, bricks: pick.picks });
    plan.push({ kind: 'remove-piece', pieceId: id });
  }

  let arborFull = false;
  for (const piece of input.add) {
    plan.push({ kind: 'add-piece', pieceId: piece.id, massKg: piece.massKg });
    arborFull = loadTowardBalance(plan, brickTypes, arborCapacityKg, piece.id) || arborFull;
  }
  // Over-pulled bricks or a pipe-heavy start leave a margin: trim it with bricks from the bridge when they fit.
  // (After a loading step this finds nothing more: that step already came as close as the bridge allows.)
  const lightestKg = Math.min(...brickTypes.map((b) => b.massKg));
  arborFull = loadTowardBalance(plan, brickTypes, arborCapacityKg) || arborFull;

  const finalKg = tidyKg(plan.imbalanceKg());
  // Why the set cannot come to balance: the arbor is full, the bridge ran out, or the lightest brick is too heavy for what is left.
  const tooCoarse = !arborFull && finalKg * purchase < lightestKg - SLACK_KG;
  // The figures behind a refusal or a warning: what the arbor still needs, what it can take, what the bridge has.
  const shortKg = finalKg * purchase;
  const bridgeLeft = () => {
    const counts = brickTypes.filter((b) => plan.bridge[b.type]).map((b) => `${plan.bridge[b.type]} ${b.type}`);
    return `${show(bricksMassKg(plan.bridge, brickTypes))}${counts.length ? ` (${counts.join(', ')})` : ''}`;
  };
  const capacityText = () =>
    `it would have to carry ${show(plan.arborSideKg() + shortKg)}, ${show(shortKg)} more than now, and its capacity is ${show(arborCapacityKg ?? Infinity)}`;
  if (finalKg > ropeLockLimitKg) {
    const code = arborFull ? 'arbor-full' : tooCoarse ? 'bricks-too-coarse' : 'not-enough-bricks';
    const reason = {
      'arbor-full': `the arbor cannot take enough bricks: ${capacityText()}.`,
      'bricks-too-coarse': `even the lightest brick (${show(lightestKg)}) would make it arbor-heavy.`,
      'not-enough-bricks': `there are not enough bricks on the loading bridge: the arbor needs ${show(shortKg)} more, and the bridge has ${bridgeLeft()} left.`,
    }[code];
    return error(
      code,
      `The set would end pipe-heavy by ${show(finalKg)}, more than the rope lock holds (${show(ropeLockLimitKg)}): ${reason} ` +
        'Do not start: bring the right bricks or check with a qualified rigger.',
    );
  }
  if (brickTypes.length && finalKg * purchase >= lightestKg - SLACK_KG) {
    warnings.push({
      severity: 'warning',
      code: arborFull ? 'arbor-full' : 'not-balanced',
      message: `The set will end pipe-heavy by ${show(finalKg)}: ${arborFull ? `the arbor is full (${capacityText()})` : `the bridge is short of bricks (the arbor needs ${show(shortKg)} more, the bridge has ${bridgeLeft()} left)`}. The rope lock can hold it; check the balance at the rail.`,
    });
  }

  const work = plan.steps;
  const peakKg = Math.max(tidyKg(startKg), ...work.map((s) => s.imbalanceAfterKg));
  const steps: PlanStep[] = [];
  if (work.length && peakKg > ropeLockLimitKg) {
    steps.push({ kind: 'tie-off', imbalanceAfterKg: tidyKg(startKg) }, ...work, { kind: 'untie', imbalanceAfterKg: finalKg });
  } else {
    steps.push(...work);
    if (!work.length && tidyKg(startKg) > ropeLockLimitKg) {
      warnings.push({
        severity: 'warning',
        code: 'out-of-balance',
        message: `The set is pipe-heavy by ${show(startKg)}, more than the rope lock holds. Keep it tied off and check with a qualified rigger.`,
      });
    }
  }
  steps.push({ kind: 'test-balance', imbalanceAfterKg: finalKg });

  const final: PlanInput = {
    ...input,
    pieces: plan.load.pieces,
    bricks: plan.load.bricks,
    bridgeStock: plan.bridge,
    remove: [],
    add: [],
  };
  return { steps, final, warnings };
}
