/**
 * The planner's preview: the same PlanInput the server builds from the schedule, run through the
 * same planChange, so what the rail operator sees here is what the session will hold.
 */
import { checkLineSet, planChange, type BrickType, type LineSetLoad, type PlanResult, type PlanWarning } from '@shared/rigging';
import type { LineSetView, ScheduleView } from '@shared/protocol/schedule';
import { newPieceKey, pieceKey, type CreateSessionInput } from '@shared/protocol/sessions-api';

export type LineSetChoice = CreateSessionInput['lineSets'][number];

export interface LineSetPreview {
  lineSet: LineSetView;
  brickTypes: BrickType[];
  start: LineSetLoad;
  plan: PlanResult;
  /** Plan warnings, then the line set checks on the load after the plan. */
  warnings: PlanWarning[];
  hasErrors: boolean;
  pieceNames: Record<string, string>;
}

export function brickTypesOf(schedule: ScheduleView): BrickType[] {
  return schedule.brickTypes.map((b) => ({ type: b.code, massKg: b.massKg, ...(b.heightM ? { heightM: b.heightM } : {}) }));
}

export function previewLineSet(schedule: ScheduleView, choice: LineSetChoice): LineSetPreview {
  const ls = schedule.lineSets.find((l) => l.id === choice.lineSetId);
  if (!ls) throw new Error(`Line set ${choice.lineSetId} is not in the schedule.`);
  const brickTypes = brickTypesOf(schedule);
  const units = schedule.venue.units;
  const pieceNames: Record<string, string> = {};
  for (const p of ls.pieces) pieceNames[pieceKey(p.id)] = p.name;
  choice.add.forEach((p, i) => (pieceNames[newPieceKey(ls.id, i)] = p.name));
  const start: LineSetLoad = {
    purchase: ls.purchase,
    pipeKg: ls.pipeKg,
    arborKg: ls.arborKg,
    pieces: ls.pieces.map((p) => ({ id: pieceKey(p.id), massKg: p.massKg })),
    bricks: { ...ls.bricks },
  };
  const plan = planChange({
    ...start,
    brickTypes,
    bridgeStock: Object.fromEntries(schedule.brickTypes.map((b) => [b.code, b.bridgeCount])),
    remove: choice.remove.map(pieceKey),
    add: choice.add.map((p, i) => ({ id: newPieceKey(ls.id, i), massKg: p.massKg })),
    ropeLockLimitKg: schedule.venue.settings.ropeLockLimitKg,
    arborCapacityKg: ls.arborCapacityKg,
    units,
  });

  // The batten after the change, for the capacity and lift line checks.
  const hung = [
    ...ls.pieces.filter((p) => !choice.remove.includes(p.id)).map((p) => ({ massKg: p.massKg, positionM: p.positionM })),
    ...choice.add.map((p) => ({ massKg: p.massKg, positionM: p.positionM ?? null })),
  ];
  const checks = plan.steps.length
    ? checkLineSet({
        lengthM: ls.pipeLengthM,
        liftLines: ls.liftLinesM.map((atM) => ({ atM, ratedKg: ls.liftLineRatingKg })),
        pipeKgPerM: ls.pipeKg / ls.pipeLengthM,
        pointLoads: hung.filter((p) => p.positionM !== null).map((p) => ({ atM: p.positionM!, massKg: p.massKg })),
        spreadLoads: hung.filter((p) => p.positionM === null).map((p) => ({ fromM: 0, toM: ls.pipeLengthM, massKg: p.massKg })),
        battenRatedKgPerM: ls.battenRatingKgPerM,
        purchase: ls.purchase,
        arborKg: ls.arborKg,
        bricks: plan.final.bricks,
        brickTypes,
        arborCapacityKg: ls.arborCapacityKg,
        maxSpanM: schedule.venue.settings.maxSpanM,
        spreaderSpacingM: schedule.venue.settings.spreaderPlateEveryM,
        units,
      })
    : [];
  const warnings = [...plan.warnings, ...checks];
  return { lineSet: ls, brickTypes, start, plan, warnings, hasErrors: warnings.some((w) => w.severity === 'error'), pieceNames };
}
