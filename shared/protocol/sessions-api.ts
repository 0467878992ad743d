import { z } from 'zod';
import { checkLineSet, liftLineShares, planChange, type LiftLineHang, type BrickCounts, type LineSetLoad, type PlanInput, type PlanResult, type PlanWarning } from '../rigging';
import type { SessionState } from './session/state';
import { pieceLoads, type ScheduleView } from './schedule';

/**
 * Whoever starts a loading session is joined as its lead at the rail at once, so only a person who
 * holds the rail operator role may start one. The server refuses with this sentence; the planner
 * says it before anyone without the role plans.
 */
export const NOT_RAIL_LEAD_TEXT =
  'A rail operator must lead a loading session: whoever starts one is joined as its lead at the rail. You do not hold the rail operator role at this venue, so ask a rail operator to start it (a technical director can give the role under People).';

/** `POST /api/sessions`: a plan of one or more line sets, each with pieces to take off and to hang. */
export const createSessionSchema = z.object({
  title: z.string().trim().min(1, 'Give the session a title').max(120),
  lineSets: z.array(z.object({
    lineSetId: z.number().int().positive(),
    /** Ids of pieces hanging on the set now, to take off. */
    remove: z.array(z.number().int().positive()).max(50).default([]),
    /** Pieces to hang. */
    add: z.array(z.object({
      name: z.string().trim().min(1, 'Name the piece').max(80),
      massKg: z.number().positive('Give a weight above zero').max(5000),
      positionM: z.number().min(0).max(100).nullable().optional(),
    })).max(50).default([]),
  })).min(1, 'Pick at least one line set').max(20)
    .refine((sets) => new Set(sets.map((s) => s.lineSetId)).size === sets.length, 'A line set appears twice'),
});
export type CreateSessionInput = z.infer<typeof createSessionSchema>;

/** The most log entries one page carries (`GET /api/sessions/:id/events`, and a `session:watch` answer). */
export const EVENTS_PAGE_LIMIT = 500;

export const eventsQuerySchema = z.object({
  after: z.coerce.number().int().min(0).default(0),
  limit: z.coerce.number().int().min(1).max(EVENTS_PAGE_LIMIT).default(EVENTS_PAGE_LIMIT),
});

/** One page of a session's log. When `more`, ask again with `after: nextAfter`. */
export interface EventsPage<E> {
  entries: E[];
  lastSeq: number;
  more: boolean;
  /** The seq to ask after for the next page (the last seq on this page, or `after` when it is empty). */
  nextAfter: number;
}
export const listSessionsQuerySchema = z.object({ active: z.enum(['0', '1']).optional() });

export interface SessionSummary {
  id: number;
  title: string;
  phase: SessionState['phase'];
  createdAtMs: number;
  createdByName: string;
  lineSets: { id: string; name: string }[];
}

/** Someone with a session open on a phone right now, or lately. */
export interface PresenceEntry {
  personId: number;
  name: string;
  role: string | null;
  connected: boolean;
  lastSeenMs: number;
}

/** Piece ids inside a session plan: hung pieces by their database id, new ones by their order. */
export const pieceKey = (pieceId: number) => `p${pieceId}`;
export const newPieceKey = (lineSetId: number, index: number) => `n${lineSetId}-${index + 1}`;
/** Line set ids inside a session plan. */
export const lineSetKey = (lineSetId: number) => `ls${lineSetId}`;

// ---------------------------------------------------------------------------------------------
// One plan builder for both sides: the client previews exactly what the server stores.

export interface PlannedLineSet {
  /** line_set.id in the schedule. */
  scheduleId: number;
  input: PlanInput;
  /** The line set before the first step. */
  start: LineSetLoad;
  result: PlanResult;
  /** Batten, lift line, arbor and span checks on the load after the change. */
  checks: PlanWarning[];
  /** What each lift line carries after the change, slack lines carrying nothing; null when not checked. */
  liftLines: LiftLineHang | null;
  /** The plan's warnings, then the checks; any `error` means the session must not start. */
  warnings: PlanWarning[];
  hasErrors: boolean;
  /** The session's name for the line set ("Line set 7 (Sea-mist drapes)"). */
  name: string;
  pieceNames: Record<string, string>;
  newPieces: Array<{ key: string; name: string; massKg: number; positionM: number | null }>;
}

/**
 * Plans every line set of a session request in order. The bridge's stock carries from one line set
 * to the next: bricks pulled from the first can go on the second.
 */
export function planSession(schedule: Pick<ScheduleView, 'venue' | 'lineSets' | 'brickTypes'>, request: CreateSessionInput): PlannedLineSet[] {
  const brickTypes = schedule.brickTypes.map((b) => ({ type: b.code, massKg: b.massKg, ...(b.heightM ? { heightM: b.heightM } : {}) }));
  let bridgeStock: BrickCounts = Object.fromEntries(schedule.brickTypes.map((b) => [b.code, b.bridgeCount]));
  return request.lineSets.map((asked) => {
    const ls = schedule.lineSets.find((l) => l.id === asked.lineSetId);
    if (!ls) throw new Error(`Line set ${asked.lineSetId} is not on this venue's schedule.`);
    const newPieces = asked.add.map((p, i) => ({ key: newPieceKey(ls.id, i), name: p.name, massKg: p.massKg, positionM: p.positionM ?? null }));
    const input: PlanInput = {
      purchase: ls.purchase,
      pipeKg: ls.pipeKg,
      arborKg: ls.arborKg,
      pieces: ls.pieces.map((p) => ({ id: pieceKey(p.id), massKg: p.massKg })),
      bricks: { ...ls.bricks },
      brickTypes,
      bridgeStock,
      remove: asked.remove.map(pieceKey),
      add: newPieces.map((p) => ({ id: p.key, massKg: p.massKg })),
      ropeLockLimitKg: schedule.venue.settings.ropeLockLimitKg,
      arborCapacityKg: ls.arborCapacityKg,
      units: schedule.venue.units,
      spreaderSpacingM: schedule.venue.settings.spreaderPlateEveryM,
    };
    const result = planChange(input);
    bridgeStock = result.final.bridgeStock;
    // The batten after the change, for the capacity and lift line checks.
    const hung = [
      ...ls.pieces.filter((p) => !asked.remove.includes(p.id)),
      ...newPieces.map((p) => ({ massKg: p.massKg, positionM: p.positionM, spreadFromM: null, spreadToM: null })),
    ];
    const batten = {
      lengthM: ls.pipeLengthM,
      liftLines: ls.liftLinesM.map((atM) => ({ atM, ratedKg: ls.liftLineRatingKg })),
      pipeKgPerM: ls.pipeKgPerM,
      ...pieceLoads(hung, ls.pipeLengthM),
    };
    const checks = result.steps.length
      ? checkLineSet({
          ...batten,
          battenRatedKgPerM: ls.battenRatingKgPerM,
          purchase: ls.purchase,
          arborKg: ls.arborKg,
          bricks: result.final.bricks,
          brickTypes,
          arborCapacityKg: ls.arborCapacityKg,
          maxSpanM: schedule.venue.settings.maxSpanM,
          spreaderSpacingM: schedule.venue.settings.spreaderPlateEveryM,
          units: schedule.venue.units,
        })
      : [];
    const flagged: PlanWarning[] = ls.outOfBalance
      ? [{ severity: 'warning', code: 'flagged-out-of-balance', message: 'Its last test of balance found it out of balance: the weights on the schedule may not match the set. Check it at the rail before anyone loads.' }]
      : [];
    // Out of service: the plan is refused whatever it would do (the director puts the set back first).
    const outOfService: PlanWarning[] = ls.outOfService !== null
      ? [{ severity: 'error', code: 'out-of-service', message: `It is out of service (${ls.outOfService}): the technical director must put it back in service before it is planned.` }]
      : [];
    const warnings = [...outOfService, ...flagged, ...result.warnings, ...checks];
    const start = { purchase: input.purchase, pipeKg: input.pipeKg, arborKg: input.arborKg, pieces: input.pieces, bricks: input.bricks };
    const pieceNames = Object.fromEntries([
      ...ls.pieces.map((p) => [pieceKey(p.id), p.name] as const),
      ...newPieces.map((p) => [p.key, p.name] as const),
    ]);
    const hasErrors = warnings.some((w) => w.severity === 'error');
    const liftLines = result.steps.length ? sharesOrNull(batten) : null;
    return { scheduleId: ls.id, input, start, result, checks, liftLines, warnings, hasErrors, name: `Line set ${ls.number} (${ls.name})`, pieceNames, newPieces };
  });
}

/** What each lift line carries, or null for a geometry the beam cannot solve (checkLineSet says why). */
export function sharesOrNull(batten: Parameters<typeof liftLineShares>[0]): LiftLineHang | null {
  try {
    return liftLineShares(batten);
  } catch {
    return null;
  }
}

/** Every error of a session plan, each naming its line set. Empty when the plan can run. */
export function sessionPlanErrors(planned: PlannedLineSet[]): string[] {
  return planned.flatMap((p) => p.warnings.filter((w) => w.severity === 'error').map((w) => `${p.name}: ${w.message}`));
}
