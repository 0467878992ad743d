/**
 * Correcting a line set from what the rail found: the test of balance measured it out by some
 * amount, so bricks go on (pipe-heavy) or come off (arbor-heavy) until it is as close to balance as
 * the bricks allow, never past it towards arbor-heavy.
 *
 * The measured figure is the truth here, not the computed one: the schedule's weights were off by
 * the difference, so every step's balance is reckoned from the measurement (common practice: a test result
 * is what the rail found, beside what was computed).
 */
import { bricksMassKg } from './apply';
import { chooseBricks, chooseBricksAtLeast, type BrickStock } from './bricks';
import type { BrickCounts, BrickType, PlanStep, PlanWarning, Purchase, Units } from './types';
import { formatMass } from './units';
import { spreaderPlatesAt } from './spreader';

/** Slack so float noise never pulls or adds a whole brick, the same as the planner's. */
const SLACK_KG = 4e-7;

export interface CorrectionInput {
  /** The imbalance the rail measured, kg at the batten: positive = pipe-heavy, negative = arbor-heavy. */
  measuredKg: number;
  purchase: Purchase;
  /** Empty arbor. */
  arborKg: number;
  /** Bricks on the arbor now. */
  bricks: BrickCounts;
  brickTypes: BrickType[];
  /** Bricks on the loading bridge, available to load. */
  bridgeStock: BrickCounts;
  /** Most the arbor may carry, empty arbor included, if known. */
  arborCapacityKg?: number;
  /** Out-of-balance the rope lock holds, kg at the batten. */
  ropeLockLimitKg: number;
  /** The set is tied off at the rail now (it must be when the measurement is beyond the rope lock). */
  tiedOff: boolean;
  units?: Units;
  /** Stack height between spreader plates: the brick step then says where each plate goes on or comes off. */
  spreaderSpacingM?: number;
}

export interface CorrectionResult {
  /**
   * The brick step (if any), then untie when tied off, then a new test of balance. Each step's
   * `imbalanceAfterKg` is reckoned from the measurement. Empty when the correction cannot be run.
   */
  steps: PlanStep[];
  /** The imbalance expected after the correction, kg at the batten (positive = pipe-heavy). */
  expectedKg: number;
  /** Any `error` means the correction must not be run; the message gives the figures. */
  warnings: PlanWarning[];
}

const stockOf = (counts: BrickCounts, brickTypes: BrickType[]): BrickStock[] =>
  brickTypes.map((b) => ({ type: b.type, massKg: b.massKg, count: counts[b.type] ?? 0 }));

/** A correction's brick step with its spreader plates, as `planChange` places them, when the spacing and heights are known. */
function withPlates(input: CorrectionInput, step: PlanStep & { kind: 'add-bricks' | 'remove-bricks'; bricks: BrickCounts }): PlanStep {
  if (input.spreaderSpacingM === undefined) return step;
  const at = spreaderPlatesAt(step.kind, input.bricks, step.bricks, input.brickTypes, input.spreaderSpacingM);
  return at?.length ? { ...step, spreaderPlatesAt: at } : step;
}

/**
 * Which bricks to add or take off to correct a measured imbalance, within the bridge stock and the
 * arbor's capacity. Pipe-heavy: loads the bricks that come closest to the measured amount without
 * passing it. Arbor-heavy: pulls at least the measured amount, as little over as the bricks allow,
 * so the set ends pipe-heavy or balanced. A set tied off stays tied until the bricks are done and
 * is untied before the new test; a correction that cannot bring it within the rope lock is refused.
 */
export function correctionSteps(input: CorrectionInput): CorrectionResult {
  const { measuredKg, purchase, brickTypes, ropeLockLimitKg, tiedOff } = input;
  const show = (kg: number) => formatMass(kg, input.units ?? 'metric');
  const warnings: PlanWarning[] = [];
  const fail = (code: string, message: string): CorrectionResult => ({
    steps: [],
    expectedKg: measuredKg,
    warnings: [...warnings, { severity: 'error', code, message }],
  });
  if (!Number.isFinite(measuredKg)) return fail('invalid-input', 'The measured imbalance must be a number.');
  if (!tiedOff && Math.abs(measuredKg) > ropeLockLimitKg + SLACK_KG) {
    return fail('not-tied-off', `It is out by ${show(Math.abs(measuredKg))}, more than the rope lock holds (${show(ropeLockLimitKg)}): tie it off at the rail first.`);
  }
  const lightestKg = brickTypes.length ? Math.min(...brickTypes.map((b) => b.massKg)) : Infinity;

  const work: PlanStep[] = [];
  let expectedKg = measuredKg;
  if (measuredKg > 0) {
    // Pipe-heavy: bricks onto the arbor, up to the measured amount and the room left on the arbor.
    const wantedKg = measuredKg * purchase;
    const arborSideKg = input.arborKg + bricksMassKg(input.bricks, brickTypes);
    const roomKg = input.arborCapacityKg === undefined ? Infinity : Math.max(0, input.arborCapacityKg - arborSideKg);
    const pick = chooseBricks(Math.min(wantedKg, roomKg) + SLACK_KG, stockOf(input.bridgeStock, brickTypes));
    expectedKg = measuredKg - pick.totalKg / purchase;
    if (pick.totalKg > 0) work.push(withPlates(input, { kind: 'add-bricks', bricks: pick.picks, imbalanceAfterKg: tidy(expectedKg) }));
    if (expectedKg > ropeLockLimitKg + SLACK_KG || (pick.totalKg === 0 && wantedKg >= lightestKg - SLACK_KG)) {
      const onBridgeKg = bricksMassKg(input.bridgeStock, brickTypes);
      const why = roomKg < wantedKg - SLACK_KG
        ? `the arbor can take only ${show(roomKg)} more (capacity ${show(input.arborCapacityKg!)}, carrying ${show(arborSideKg)})`
        : `the loading bridge holds only ${show(onBridgeKg)} of bricks`;
      if (pick.totalKg === 0) return fail('cannot-correct', `It needs ${show(wantedKg)} of bricks on the arbor, but ${why}. Bring bricks to the bridge or check with a qualified rigger.`);
      if (expectedKg > ropeLockLimitKg + SLACK_KG) {
        return fail('cannot-correct', `It needs ${show(wantedKg)} of bricks on the arbor, but ${why}: it would stay pipe-heavy by ${show(expectedKg)}, more than the rope lock holds (${show(ropeLockLimitKg)}). Keep it tied off and check with a qualified rigger.`);
      }
      warnings.push({ severity: 'warning', code: 'correction-short', message: `It needs ${show(wantedKg)} of bricks on the arbor, but ${why}: it will stay pipe-heavy by ${show(expectedKg)}.` });
    }
  } else if (measuredKg < 0) {
    // Arbor-heavy: bricks off the arbor, at least the measured amount, so it ends pipe-heavy or balanced.
    const needKg = -measuredKg * purchase;
    const pick = chooseBricksAtLeast(needKg - SLACK_KG, stockOf(input.bricks, brickTypes));
    if (!pick) {
      const onArborKg = bricksMassKg(input.bricks, brickTypes);
      return fail('cannot-correct', `It needs ${show(needKg)} of bricks off the arbor, but the arbor holds only ${show(onArborKg)} of bricks: the empty arbor outweighs the batten. Keep it tied off and check with a qualified rigger.`);
    }
    expectedKg = measuredKg + pick.totalKg / purchase;
    if (pick.totalKg > 0) work.push(withPlates(input, { kind: 'remove-bricks', bricks: pick.picks, imbalanceAfterKg: tidy(expectedKg) }));
    if (expectedKg > ropeLockLimitKg + SLACK_KG) {
      return fail('cannot-correct', `Taking off the ${show(pick.totalKg)} of bricks that end it pipe-heavy leaves it ${show(expectedKg)} pipe-heavy, more than the rope lock holds (${show(ropeLockLimitKg)}): the bricks are too coarse. Keep it tied off and check with a qualified rigger.`);
    }
  }
  if (!work.length) {
    return fail('nothing-to-correct', `It is out by ${show(Math.abs(measuredKg))}, less than the lightest brick (${show(lightestKg)}): no brick would bring it closer to balance.`);
  }
  const steps: PlanStep[] = [...work];
  if (tiedOff) steps.push({ kind: 'untie', imbalanceAfterKg: tidy(expectedKg) });
  steps.push({ kind: 'test-balance', imbalanceAfterKg: tidy(expectedKg) });
  return { steps, expectedKg: tidy(expectedKg), warnings };
}

/** Rounds to the milligram, like the planner, so float noise never shows as "arbor-heavy by 0.0000001". */
const tidy = (kg: number) => Math.round(kg * 1e6) / 1e6 + 0;
