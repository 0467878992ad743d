/**
 * Practice sessions over HTTP: the server sets a practice up (its plan from the venue's schedule or
 * invented, and the crew's seed), the phone runs it against the simulated crew, and the server keeps
 * the result after playing every tap again through the same rules.
 */
import { z } from 'zod';
import { PRACTICE_ROLES, type PracticeDebrief, type PracticeEntry, type PracticeRole, type PracticeSetup } from '../practice';
import { sessionActionSchema, systemActionSchema } from './session';
import { createSessionSchema } from './sessions-api';

/** Most taps one practice may keep: a few line sets' worth, and one upload within the API's size limit. */
export const MAX_PRACTICE_TAPS = 300;
/** Most line sets one practice may hold. */
export const MAX_PRACTICE_LINE_SETS = 3;

export const practiceRoleSchema = z.enum(PRACTICE_ROLES);

export const startPracticeSchema = z.object({
  role: practiceRoleSchema,
  source: z.discriminatedUnion('kind', [
    z.object({ kind: z.literal('invented') }),
    z.object({
      kind: z.literal('line-sets'),
      lineSets: createSessionSchema.shape.lineSets.element.array().min(1, 'Pick a line set').max(MAX_PRACTICE_LINE_SETS, `A practice holds at most ${MAX_PRACTICE_LINE_SETS} line sets`),
    }),
  ]),
  /** Faster than a crew's own pace for a quick run-through: 1 is real time. */
  pace: z.number().min(0.1).max(1).default(1),
});
export type StartPracticeInput = z.input<typeof startPracticeSchema>;

const practiceTapSchema = z.object({
  atMs: z.number().int().min(0).max(8.64e15),
  personId: z.number().int().min(0),
  action: z.union([sessionActionSchema, systemActionSchema]),
});

export const finishPracticeSchema = z.object({
  taps: z.array(practiceTapSchema).min(1).max(MAX_PRACTICE_TAPS, `A practice keeps at most ${MAX_PRACTICE_TAPS} taps`),
  /** When the practice ended on the phone: finished by the rules or stopped by the person. */
  endedAtMs: z.number().int().min(0).max(8.64e15),
});
export type FinishPracticeInput = z.infer<typeof finishPracticeSchema>;

export const trainingQuerySchema = z.object({ personId: z.coerce.number().int().positive().optional() });

export type PracticeOutcome = PracticeDebrief['outcome'] | 'running';

/** One practice in a list: the venue's training record or a person's own. */
export interface PracticeSummary {
  id: number;
  personId: number;
  personName: string;
  role: PracticeRole;
  title: string;
  source: 'invented' | 'line-sets';
  startedAtMs: number;
  endedAtMs: number | null;
  outcome: PracticeOutcome;
  /** Set once the practice is kept. */
  figures: Pick<PracticeDebrief, 'durationMs' | 'outOfBalanceMs' | 'beyondRopeLockMs' | 'yourRefusals' | 'yourMedianAnswerMs' | 'reAlerts'> | null;
}

/** `POST /api/practice-runs` answers with what the phone needs to run the practice. */
export interface PracticeStart {
  practice: PracticeSummary;
  setup: PracticeSetup;
  seed: number;
  pace: number;
}

/** One practice in full: `GET /api/practice-runs/:id` and the answer to keeping it. */
export interface PracticeDetail {
  practice: PracticeSummary;
  setup: PracticeSetup;
  debrief: PracticeDebrief | null;
  log: PracticeEntry[];
}
