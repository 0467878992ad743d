/**
 * Capacity checks for a line set, as warnings a crew member can read. Railcall's figures are a
 * planning aid: every message sends the person to the venue's own ratings and a qualified rigger.
 */
import { bricksMassKg } from './apply';
import type { PointLoad, SpreadLoad } from './beam';
import { slackAwareLiftLineLoads } from './slack';
import type { BrickCounts, BrickType, PlanWarning, Purchase, Units } from './types';
import { formatLength, formatMass, M_PER_FT, M_PER_IN } from './units';

/** A spreader plate every 24 in of brick stack (common practice). */
export const DEFAULT_SPREADER_SPACING_M = 24 * M_PER_IN;
/** Lift lines no more than 10 ft apart (a rigging maker's mounting guidance; common practice). */
export const DEFAULT_MAX_SPAN_M = 10 * M_PER_FT;

export interface LiftLine {
  /** Where the line picks up the batten, m from the batten's start. */
  atM: number;
  /** The line's rated load in kg, if the venue knows it. */
  ratedKg?: number;
}

export interface LineSetCheckInput {
  lengthM: number;
  liftLines: LiftLine[];
  /** The pipe's own mass per metre. */
  pipeKgPerM: number;
  /** What hangs on the batten. */
  pointLoads?: PointLoad[];
  spreadLoads?: SpreadLoad[];
  /** The batten's rated distributed load (hung load, not counting the pipe), kg per metre. */
  battenRatedKgPerM?: number;
  /** The batten's rated total hung load, kg. */
  battenRatedTotalKg?: number;
  purchase?: Purchase;
  /** Empty arbor and the bricks on it. */
  arborKg?: number;
  bricks?: BrickCounts;
  brickTypes?: BrickType[];
  /** Most the arbor may carry, empty arbor included. */
  arborCapacityKg?: number;
  /** Spreader plates in the brick stack now; when unknown, the check reminds how many are due. */
  spreaderPlates?: number;
  spreaderSpacingM?: number;
  maxSpanM?: number;
  units?: Units;
}

const RIGGER = 'Check with a qualified rigger and the venue\'s ratings before flying this set.';

/** Spreader plates due for a stack of this height: one for each full spacing of bricks. */
export function spreaderPlatesDue(stackHeightM: number, spacingM = DEFAULT_SPREADER_SPACING_M): number {
  return Math.floor(stackHeightM / spacingM + 1e-9);
}

/** What one lift line carries on the batten as it hangs (slack lines allowed). */
export interface LiftLineShare {
  /** 1 for the first line given, and so on. */
  number: number;
  atM: number;
  kg: number;
  slack: boolean;
  ratedKg?: number;
}

export type LiftLineHang =
  | { holds: true; lines: LiftLineShare[] }
  | { holds: false; tipsAbout: number; centreM: number };

/**
 * What each lift line carries, lines that go slack carrying nothing (`slackAwareLiftLineLoads`), or
 * that the batten tips. Throws a RangeError on a geometry the beam cannot solve (see `liftLineLoads`).
 */
export function liftLineShares(input: Pick<LineSetCheckInput, 'lengthM' | 'liftLines' | 'pipeKgPerM' | 'pointLoads' | 'spreadLoads'>): LiftLineHang {
  const hang = slackAwareLiftLineLoads({
    lengthM: input.lengthM,
    liftLinesM: input.liftLines.map((l) => l.atM),
    selfMassKgPerM: input.pipeKgPerM,
    pointLoads: input.pointLoads ?? [],
    spreadLoads: input.spreadLoads ?? [],
  });
  if (!hang.holds) return hang;
  return {
    holds: true,
    lines: input.liftLines.map((line, i) => ({
      number: i + 1,
      atM: line.atM,
      kg: hang.loadsKg[i],
      slack: hang.slackLines.includes(i),
      ...(line.ratedKg !== undefined ? { ratedKg: line.ratedKg } : {}),
    })),
  };
}

/** "Line 1 carries 198.2 lb, line 2 is slack, …": one sentence for the screens and the warnings. */
export function liftLineSharesText(lines: LiftLineShare[], units: Units): string {
  const parts = lines.map((l) => `line ${l.number} ${l.slack ? 'is slack' : `carries ${formatMass(l.kg, units)}`}`);
  const text = parts.join(', ');
  return text.charAt(0).toUpperCase() + text.slice(1);
}

/**
 * Every capacity problem found on the line set: batten over its rated load (per metre and total),
 * a lift line over its rating (with slack lines carrying nothing), a lift line going slack (a warning:
 * the others carry its share), the batten tipping past its last line, the arbor over capacity, a brick
 * stack missing a spreader plate, a span between lift lines longer than the venue's limit. Empty when nothing is found.
 */
export function checkLineSet(input: LineSetCheckInput): PlanWarning[] {
  const units = input.units ?? 'metric';
  const kg = (v: number) => formatMass(v, units);
  const len = (v: number) => formatLength(v, units);
  const perLength = (kgPerM: number) =>
    units === 'imperial' ? `${kg(kgPerM * M_PER_FT)} per foot` : `${kg(kgPerM)} per metre`;
  const warnings: PlanWarning[] = [];
  const warn = (severity: PlanWarning['severity'], code: string, message: string) =>
    warnings.push({ severity, code, message: `${message} ${RIGGER}` });

  const pointLoads = input.pointLoads ?? [];
  const spreadLoads = input.spreadLoads ?? [];
  const hungKg = [...pointLoads, ...spreadLoads].reduce((sum, l) => sum + l.massKg, 0);

  if (input.battenRatedTotalKg !== undefined && hungKg > input.battenRatedTotalKg) {
    warn('error', 'batten-over-total', `The batten carries ${kg(hungKg)}, over its rated ${kg(input.battenRatedTotalKg)}.`);
  }
  if (input.battenRatedKgPerM !== undefined) {
    const averageKgPerM = hungKg / input.lengthM;
    if (averageKgPerM > input.battenRatedKgPerM) {
      warn('error', 'batten-over-per-length',
        `The batten carries ${perLength(averageKgPerM)} on average, over its rating of ${perLength(input.battenRatedKgPerM)}.`);
    }
    // A heavy drape on a short stretch can pass the average and still overload that stretch.
    for (const s of spreadLoads) {
      const widthM = s.toM - s.fromM;
      if (widthM > 0 && s.massKg / widthM > input.battenRatedKgPerM && averageKgPerM <= input.battenRatedKgPerM) {
        warn('warning', 'batten-concentrated',
          `The load from ${len(s.fromM)} to ${len(s.toM)} weighs ${perLength(s.massKg / widthM)}, over the batten's rating of ${perLength(input.battenRatedKgPerM)}.`);
      }
    }
  }

  const positions = input.liftLines.map((l) => l.atM);
  if (positions.length >= 2) {
    const hang = liftLineShares(input);
    if (!hang.holds) {
      const line = hang.tipsAbout;
      warn('error', 'batten-tips',
        `The weight on the batten is centred at ${len(hang.centreM)}, past lift line ${line + 1} (at ${len(positions[line])}), the last line on that side: the batten would tip. Move weight back inside the lift lines or add a line.`);
    } else {
      for (const share of hang.lines) {
        if (share.ratedKg !== undefined && share.kg > share.ratedKg) {
          warn('error', 'lift-line-over', `Lift line ${share.number} (at ${len(share.atM)}) carries ${kg(share.kg)}, over its rated ${kg(share.ratedKg)}.`);
        }
      }
      const slack = hang.lines.filter((l) => l.slack);
      if (slack.length) {
        const named = slack.map((l) => `${l.number} (at ${len(l.atM)})`);
        const which = slack.length === 1 ? `Lift line ${named[0]} goes` : `Lift lines ${named.slice(0, -1).join(', ')} and ${named.at(-1)} go`;
        warn('warning', 'lift-line-slack',
          `${which} slack: the batten rises off ${slack.length === 1 ? 'it' : 'them'} and the other lines carry the load. ${liftLineSharesText(hang.lines, units)}.`);
      }
    }
    const maxSpanM = input.maxSpanM ?? DEFAULT_MAX_SPAN_M;
    const sorted = [...positions].sort((a, b) => a - b);
    for (let i = 1; i < sorted.length; i++) {
      const spanM = sorted[i] - sorted[i - 1];
      if (spanM > maxSpanM + 1e-9) {
        warn('error', 'span-too-long',
          `The batten spans ${len(spanM)} between lift lines at ${len(sorted[i - 1])} and ${len(sorted[i])}, longer than the ${len(maxSpanM)} limit.`);
      }
    }
  } else {
    warn('error', 'too-few-lift-lines', 'A batten must hang from at least two lift lines.');
  }

  const brickTypes = input.brickTypes ?? [];
  const bricks = input.bricks ?? {};
  if (input.arborCapacityKg !== undefined) {
    const arborSideKg = (input.arborKg ?? 0) + bricksMassKg(bricks, brickTypes);
    if (arborSideKg > input.arborCapacityKg) {
      warn('error', 'arbor-over-capacity', `The arbor carries ${kg(arborSideKg)}, over its capacity of ${kg(input.arborCapacityKg)}.`);
    }
  }

  const stackHeightM = brickTypes.reduce((sum, b) => sum + (b.heightM ?? 0) * (bricks[b.type] ?? 0), 0);
  const spacingM = input.spreaderSpacingM ?? DEFAULT_SPREADER_SPACING_M;
  const due = spreaderPlatesDue(stackHeightM, spacingM);
  if (due > 0 && (input.spreaderPlates === undefined || input.spreaderPlates < due)) {
    const have = input.spreaderPlates === undefined ? '' : ` and ${input.spreaderPlates} ${input.spreaderPlates === 1 ? 'is' : 'are'} in`;
    warn('warning', 'spreader-plate-due',
      `The brick stack is ${len(stackHeightM)} tall: a spreader plate is due every ${len(spacingM)}, so ${due} ${due === 1 ? 'is' : 'are'} needed${have}.`);
  }
  return warnings;
}
