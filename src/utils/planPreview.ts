/**
 * The planner's preview: the very planSession the server runs when the session is created, so what
 * the rail operator sees here is what the session will hold (bridge stock carried from one line set
 * to the next, the same capacity checks).
 */
import type { BrickType } from '@shared/rigging';
import type { ScheduleView } from '@shared/protocol/schedule';
import { planSession, type CreateSessionInput, type PlannedLineSet } from '@shared/protocol/sessions-api';

export type LineSetChoice = CreateSessionInput['lineSets'][number];
export type LineSetPreview = PlannedLineSet & { lineSet: ScheduleView['lineSets'][number]; brickTypes: BrickType[]; plan: PlannedLineSet['result'] };

/** Previews one line set as the server will plan it, after the line sets chosen before it. */
export function previewLineSet(schedule: ScheduleView, choice: LineSetChoice, before: LineSetChoice[] = []): LineSetPreview {
  const planned = planSession(schedule, { title: 'preview', lineSets: [...before, choice] }).at(-1)!;
  const lineSet = schedule.lineSets.find((l) => l.id === choice.lineSetId)!;
  return { ...planned, lineSet, brickTypes: planned.input.brickTypes, plan: planned.result };
}
