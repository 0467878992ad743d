/**
 * The state of one live loading session: plain JSON, stored whole in one column and sent to phones.
 * Only `decide` (machine.ts) makes a new state from an old one.
 */
import { applyStep, formatMass, loadImbalanceKg, type BrickCounts, type BrickType, type LineSetLoad, type PlanStep, type StepKind, type Units } from '../../rigging';
import type { Role, SessionRole } from '../roles';
import { DEFAULT_SETTINGS, MAX_LINE_SETS, MAX_STEPS, sessionSettingsSchema, type ProxyClearVia, type SessionSettings, type TestResult } from './schema';

/** Who sends an action. `venueRoles` are the roles the person holds at the venue right now. */
export interface Actor {
  personId: number;
  name: string;
  venueRoles: Role[];
}

/** Railcall itself, for actions the server takes on its own (re-alerts). */
export const SYSTEM_ACTOR: Actor = Object.freeze({ personId: 0, name: 'Railcall', venueRoles: [] as Role[] });

export interface Participant {
  personId: number;
  name: string;
  /** The role the person joined in (one per person per session). */
  role: SessionRole;
  joinedAtMs: number;
}

/**
 * Where one line set stands, in the order the trade works it:
 * waiting → move-called → in-position → rail-clear-called → rail-clear → loading-complete → tested.
 */
export const LINE_SET_STAGES = [
  'waiting',
  'move-called',
  'in-position',
  'rail-clear-called',
  'rail-clear',
  'loading-complete',
  'tested',
] as const;
export type LineSetStage = (typeof LINE_SET_STAGES)[number];

/** The rail operator's call to move the set, and who has answered "clear". */
export interface MoveCall {
  calledAtMs: number;
  byPersonId: number;
  /**
   * Everyone who has answered "clear". `recordedBy` is set when the lead recorded the answer for a
   * silent person after a re-alert (heard `via` voice, radio or seen), not the person's own phone.
   */
  answers: Array<{ personId: number; name: string; atMs: number; recordedBy?: { personId: number; name: string; via: ProxyClearVia } }>;
  /** Re-alerts sent to silent people: how many and when the last one went. */
  alerts: Array<{ personId: number; count: number; lastMs: number }>;
}

export interface BalanceTest {
  result: TestResult;
  /** Estimated out-of-balance in kg at the batten; null when balanced. */
  estimateKg: number | null;
  note: string | null;
  atMs: number;
  byPersonId: number;
}

/** A correction worked out from a test out of balance: its steps follow the plan's, from `fromStep`. */
export interface Correction {
  fromStep: number;
  /** What the rail measured (kg at the batten, positive = pipe-heavy) and what was computed then. */
  measuredKg: number;
  computedKg: number;
  /** The load before the correction's first step (the schedule learns the difference at its test). */
  loadBefore: LineSetLoad;
  atMs: number;
}

export interface LineSetState {
  id: string;
  name: string;
  /** Names to show for piece ids ("drape-a" → "Drape A"); the id is shown when missing. */
  pieceNames: Record<string, string>;
  steps: PlanStep[];
  /** `done[i]` is true once step i has been confirmed (tie-off, untie and test steps by their own actions). */
  done: boolean[];
  brickTypes: BrickType[];
  ropeLockLimitKg: number;
  startLoad: LineSetLoad;
  /** The load after every confirmed step, recomputed with applyStep. */
  load: LineSetLoad;
  /** loadImbalanceKg(load): kg at the batten, positive = pipe-heavy. */
  imbalanceKg: number;
  stage: LineSetStage;
  /** The plan contains a tie-off step: the rail operator ties off before the rail is cleared. */
  needsTieOff: boolean;
  /** Tied off right now. */
  tiedOff: boolean;
  call: MoveCall | null;
  lockedAtMs: number | null;
  railClearAtMs: number | null;
  loadingCompleteAtMs: number | null;
  tests: BalanceTest[];
  /** The last test found it out of balance; a later balanced test clears it. */
  flagged: boolean;
  /**
   * The imbalance by the rail's measure: the last test's figure (0 when balanced), moved by every step
   * confirmed since. Undefined until the first test. Shown beside the computed `imbalanceKg`.
   */
  measuredKg?: number;
  /** Corrections worked out for this set, oldest first (missing on sessions stored before corrections). */
  corrections?: Correction[];
  /** Most the arbor may carry, empty arbor included, if the venue knows it. */
  arborCapacityKg?: number;
}

export interface Hold {
  byPersonId: number;
  byName: string;
  reason: string | null;
  atMs: number;
  /** Everyone who has acknowledged it (the caller counts). */
  acks: Array<{ personId: number; name: string; atMs: number }>;
}

export type SessionPhase = 'gathering' | 'loading' | 'finished';

export interface SessionState {
  /** Shape version of this JSON, for stored rows. */
  v: 1;
  phase: SessionPhase;
  settings: SessionSettings;
  /** People joined now (a person who leaves is removed; the log keeps the history). */
  participants: Participant[];
  /** The rail operator who leads: the first person to join in the rail role. */
  leadPersonId: number | null;
  lineSets: LineSetState[];
  /** Index of the line set called last (being worked, or just tested); null before the first call. */
  activeIndex: number | null;
  hold: Hold | null;
  /** When the last hold was released: silence is counted again from here. */
  lastHoldReleasedAtMs: number | null;
  beganAtMs: number | null;
  shortCrewReason: string | null;
  endedAtMs: number | null;
  /** 'complete': every line set tested in balance; 'ended': the lead ended it with a reason. */
  endedHow: 'complete' | 'ended' | null;
  endReason: string | null;
  /** Bricks on the loading bridge, as this session has moved them (missing on sessions stored before corrections). */
  bridgeStock?: BrickCounts;
}

export interface LineSetInput {
  id: string;
  name: string;
  /** The plan's steps (from the planner), in order. */
  steps: PlanStep[];
  /** The line set as it is before the first step. */
  load: LineSetLoad;
  brickTypes: BrickType[];
  /** Out-of-balance the rope lock holds, kg at the batten (venue setting; 50 lb by default). */
  ropeLockLimitKg: number;
  pieceNames?: Record<string, string>;
  arborCapacityKg?: number;
}

export interface CreateSessionInput {
  lineSets: LineSetInput[];
  settings?: Partial<SessionSettings>;
  /** Bricks on the loading bridge when the session opens, for working out corrections. */
  bridgeStock?: BrickCounts;
}

/** Steps the loaders or deck crew confirm one at a time while the rail is clear. */
export const WORK_STEP_KINDS: readonly StepKind[] = ['remove-bricks', 'add-bricks', 'remove-piece', 'add-piece'];
export const isWorkStep = (step: PlanStep): boolean => WORK_STEP_KINDS.includes(step.kind);
export const isBrickStep = (step: PlanStep): boolean => step.kind === 'remove-bricks' || step.kind === 'add-bricks';

/** The units a session's sentences use: the venue's, kept in its settings; pounds for sessions stored before that. */
export function sessionUnits(state: { settings: Pick<SessionSettings, 'units'> }): Units {
  return state.settings.units ?? 'imperial';
}

/** Floating-point slack when judging "arbor-heavy" after a step, in kg. */
export const ARBOR_HEAVY_TOLERANCE_KG = 0.001;

/** A plan that cannot be run as given; the message is written for the person who made it. */
export class SessionPlanError extends Error {
  override name = 'SessionPlanError';
}

/**
 * A new session from the plan. Replays every line set's steps through applyStep so a plan that
 * cannot happen never reaches the rail: it throws SessionPlanError when a step cannot be applied,
 * when any step would leave the set arbor-heavy (the line set stays pipe-heavy, so a runaway has the
 * weight low: order of operations, common practice), or when a step goes beyond the rope lock limit and the
 * plan has no tie-off.
 */
export function createSessionState(input: CreateSessionInput): SessionState {
  const settings = sessionSettingsSchema.parse({
    ...DEFAULT_SETTINGS,
    ...input.settings,
    minCrew: { ...DEFAULT_SETTINGS.minCrew, ...input.settings?.minCrew },
  });
  if (input.lineSets.length === 0) throw new SessionPlanError('A session needs at least one line set.');
  if (input.lineSets.length > MAX_LINE_SETS) {
    throw new SessionPlanError(`A session can hold at most ${MAX_LINE_SETS} line sets.`);
  }
  const ids = new Set<string>();
  const lineSets = input.lineSets.map((ls): LineSetState => {
    if (ids.has(ls.id)) throw new SessionPlanError(`Line set id "${ls.id}" appears twice.`);
    ids.add(ls.id);
    if (ls.steps.length > MAX_STEPS) {
      throw new SessionPlanError(`${ls.name}: a plan can have at most ${MAX_STEPS} steps.`);
    }
    const needsTieOff = ls.steps.some((s) => s.kind === 'tie-off');
    let load = structuredClone(ls.load);
    let startKg: number;
    try {
      startKg = loadImbalanceKg(load, ls.brickTypes);
      ls.steps.forEach((step, i) => {
        load = applyStep(load, step, ls.brickTypes);
        const afterKg = loadImbalanceKg(load, ls.brickTypes);
        if (isWorkStep(step) && afterKg < -ARBOR_HEAVY_TOLERANCE_KG) {
          throw new SessionPlanError(
            `${ls.name}: step ${i + 1} would leave the set ${formatMass(Math.abs(afterKg), sessionUnits({ settings }))} arbor-heavy.`,
          );
        }
        if (isWorkStep(step) && Math.abs(afterKg) > ls.ropeLockLimitKg && !needsTieOff) {
          throw new SessionPlanError(
            `${ls.name}: step ${i + 1} goes beyond the rope lock limit, but the plan has no tie-off.`,
          );
        }
      });
    } catch (error) {
      if (error instanceof SessionPlanError) throw error;
      throw new SessionPlanError(`${ls.name}: ${(error as Error).message}`);
    }
    return {
      id: ls.id,
      name: ls.name,
      pieceNames: { ...ls.pieceNames },
      steps: structuredClone(ls.steps),
      done: ls.steps.map(() => false),
      brickTypes: structuredClone(ls.brickTypes),
      ropeLockLimitKg: ls.ropeLockLimitKg,
      startLoad: structuredClone(ls.load),
      load: structuredClone(ls.load),
      imbalanceKg: startKg,
      stage: 'waiting',
      needsTieOff,
      tiedOff: false,
      call: null,
      lockedAtMs: null,
      railClearAtMs: null,
      loadingCompleteAtMs: null,
      tests: [],
      flagged: false,
      corrections: [],
      ...(ls.arborCapacityKg !== undefined ? { arborCapacityKg: ls.arborCapacityKg } : {}),
    };
  });
  return {
    v: 1,
    phase: 'gathering',
    settings,
    participants: [],
    leadPersonId: null,
    lineSets,
    activeIndex: null,
    hold: null,
    lastHoldReleasedAtMs: null,
    beganAtMs: null,
    shortCrewReason: null,
    endedAtMs: null,
    endedHow: null,
    endReason: null,
    bridgeStock: { ...input.bridgeStock },
  };
}

/** The participant with this id, or undefined when the person has not joined. */
export function participantOf(state: SessionState, personId: number): Participant | undefined {
  return state.participants.find((p) => p.personId === personId);
}

/** The line set being worked (or just tested), if any. */
export function activeLineSet(state: SessionState): LineSetState | null {
  return state.activeIndex === null ? null : state.lineSets[state.activeIndex];
}

/** Index of the next work step to confirm on this line set, or -1 when every work step is done. */
export function nextWorkStepIndex(lineSet: LineSetState): number {
  return lineSet.steps.findIndex((step, i) => isWorkStep(step) && !lineSet.done[i]);
}

/** Deck crew and loaders joined now, who must answer "clear" to every move call. */
export function mustAnswerClear(state: SessionState): Participant[] {
  return state.participants.filter((p) => p.role === 'deck' || p.role === 'loader');
}

/** The people who have not yet answered "clear" to the current move call, by name (empty if no call is open). */
export function notYetClear(state: SessionState): Participant[] {
  const ls = activeLineSet(state);
  if (!ls || ls.stage !== 'move-called' || !ls.call) return [];
  const answered = new Set(ls.call.answers.map((a) => a.personId));
  return mustAnswerClear(state).filter((p) => !answered.has(p.personId));
}

/** How many more people of each role must join before the lead may begin without a reason. */
export function crewShortfall(state: SessionState): Array<{ role: 'rail' | 'loader' | 'deck'; need: number; joined: number }> {
  const short: Array<{ role: 'rail' | 'loader' | 'deck'; need: number; joined: number }> = [];
  for (const role of ['rail', 'loader', 'deck'] as const) {
    const joined = state.participants.filter((p) => p.role === role).length;
    const need = state.settings.minCrew[role];
    if (joined < need) short.push({ role, need, joined });
  }
  return short;
}

/** A role the plan needs for some step while nobody joined holds it, with the line sets that need it. */
export interface MissingStepRole {
  role: 'loader' | 'deck';
  lineSetNames: string[];
}

/**
 * The roles nobody joined can act in although a step still to do needs them: bricks need a loader,
 * pieces the deck crew. Beginning without them would leave the crew waiting on a step nobody can do.
 */
export function missingStepRoles(state: SessionState): MissingStepRole[] {
  const missing: MissingStepRole[] = [];
  for (const role of ['loader', 'deck'] as const) {
    if (state.participants.some((p) => p.role === role)) continue;
    const needs = (step: PlanStep) => (role === 'loader' ? isBrickStep(step) : step.kind === 'remove-piece' || step.kind === 'add-piece');
    const lineSetNames = state.lineSets.filter((ls) => ls.steps.some((step, i) => !ls.done[i] && needs(step))).map((ls) => ls.name);
    if (lineSetNames.length) missing.push({ role, lineSetNames });
  }
  return missing;
}

/** True when the set's plan has nothing to hang, take off or move: a test only. */
export function isTestOnly(lineSet: LineSetState): boolean {
  return !lineSet.steps.some(isWorkStep);
}

/** The step index where this step's correction starts, or null when the step is the plan's own. */
export function correctionOf(lineSet: LineSetState, index: number): Correction | null {
  const all = lineSet.corrections ?? [];
  for (let i = all.length - 1; i >= 0; i--) if (index >= all[i].fromStep) return all[i];
  return null;
}

