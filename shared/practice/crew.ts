/**
 * The simulated crew of a practice session: people who answer like people do. Each simulated member
 * looks at the session the way a phone does (`nextStepFor`, `allowedActions`: the same shared rules)
 * and means to do their next duty after a human delay; sometimes late, sometimes only once Railcall
 * re-alerts them, and now and then they tap something out of order first, which the rules refuse.
 * The crew never decides anything: every tap goes through `decide` like a real one.
 */
import type { SessionRole } from '../protocol/roles';
import {
  activeLineSet,
  allowedActions,
  crewShortfall,
  nextStepFor,
  nextWorkStepIndex,
  sessionActionSchema,
  type ActionType,
  type SessionAction,
  type SessionState,
} from '../protocol/session';
import { humanDelayMs, seededRandom, type Random } from './random';
import { balancedWithinKg, type PracticePerson } from './people';

/** How often people slip, per intention (common practice for a training drill; not from a source). */
export interface CrewHabits {
  /** Answers "clear" only after the re-alert time has passed. */
  lateAnswer: number;
  /** Does not answer at all until Railcall re-alerts them. */
  forgets: number;
  /** Taps something out of order before doing the right thing. */
  outOfOrder: number;
  /** Calls a hold (at most once a session) while loading is under way. */
  callsHold: number;
}

export const USUAL_HABITS: CrewHabits = { lateAnswer: 0.15, forgets: 0.1, outOfOrder: 0.1, callsHold: 0.03 };

/** Median time a person takes for each duty, ms (from memory of crews at work; a drill can speed it up). */
const MEDIAN_MS: Partial<Record<ActionType, number>> = {
  begin: 4000,
  'call-move': 3000,
  'answer-clear': 3000,
  'confirm-locked': 3000,
  'confirm-tie-off': 8000,
  'call-clear-rail': 3000,
  'confirm-rail-clear': 4000,
  'call-loading-complete': 3000,
  'confirm-untie': 6000,
  'record-test': 10000,
  'ack-hold': 2500,
  'release-hold': 6000,
};
const BRICK_MS = 2500;
const PIECE_MS = 12000;

/** What each role may mistakenly reach for (the buttons on their own screen). */
const REPERTOIRE: Record<SessionRole, ActionType[]> = {
  rail: ['begin', 'call-move', 'confirm-locked', 'confirm-rail-clear', 'record-test'],
  loader: ['call-clear-rail', 'confirm-step', 'call-loading-complete', 'answer-clear'],
  deck: ['answer-clear', 'confirm-step'],
  'stage-manager': [],
};

const HOLD_REASONS = ['Someone is walking under the gallery', 'A brick is not seated in the arbor', 'Lost sight of the batten'];

interface Intent {
  /** What the member saw when they made up their mind; a change of situation makes a new intent. */
  situation: string;
  dueMs: number;
  action: SessionAction;
  /** A slip: a tap the rules will refuse, before the right one. */
  slip?: SessionAction;
  slipDueMs?: number;
}

/** A concrete action of this type for this person now, or null when the type needs what a drill cannot say. */
export function actionFor(type: ActionType, state: SessionState, person: PracticePerson): SessionAction | null {
  const ls = activeLineSet(state);
  let action: unknown;
  switch (type) {
    case 'join':
      action = { type, role: person.role };
      break;
    case 'begin':
      action = crewShortfall(state).length ? { type, shortCrewReason: 'Practice with a short crew' } : { type };
      break;
    case 'confirm-step':
      action = { type, stepIndex: nextStepFor(state, person.personId).stepIndex ?? (ls ? Math.max(0, nextWorkStepIndex(ls)) : 0) };
      break;
    case 'record-test': {
      const imbalance = ls?.imbalanceKg ?? 0;
      if (!ls || Math.abs(imbalance) <= balancedWithinKg(ls.brickTypes)) action = { type, result: 'balanced' };
      else {
        action = {
          type,
          result: imbalance > 0 ? 'pipe-heavy' : 'arbor-heavy',
          estimateKg: Math.round(Math.abs(imbalance) * 10) / 10,
          tiedOff: Math.abs(imbalance) > ls.ropeLockLimitKg,
        };
      }
      break;
    }
    case 'call-hold':
      action = { type, reason: HOLD_REASONS[0] };
      break;
    default:
      action = { type };
  }
  const parsed = sessionActionSchema.safeParse(action);
  return parsed.success ? parsed.data : null;
}

function situationOf(state: SessionState, person: PracticePerson, main: ActionType): string {
  const ls = activeLineSet(state);
  const alerts = ls?.call?.alerts.find((a) => a.personId === person.personId)?.count ?? 0;
  return [state.phase, main, state.activeIndex, ls?.stage, ls ? nextWorkStepIndex(ls) : -1, state.hold?.atMs ?? 0, alerts].join('|');
}

function dutyMs(action: SessionAction, state: SessionState): number {
  if (action.type === 'confirm-step') {
    const step = activeLineSet(state)?.steps[action.stepIndex];
    if (step && (step.kind === 'add-bricks' || step.kind === 'remove-bricks')) {
      const bricks = Object.values(step.bricks ?? {}).reduce((sum, n) => sum + (n ?? 0), 0);
      return 3000 + BRICK_MS * bricks;
    }
    return PIECE_MS;
  }
  return MEDIAN_MS[action.type] ?? 3000;
}

/** The simulated members of one practice session and what each means to do next. */
export class SimulatedCrew {
  private readonly random: Random;
  private readonly intents = new Map<number, Intent | null>();
  /** The situation each member last acted in: if nothing changed after, they do not tap the same again. */
  private readonly actedIn = new Map<number, string>();
  private holdCalled = false;

  constructor(
    readonly members: readonly PracticePerson[],
    seed: number,
    /** Multiplies every delay: 1 is a crew's own pace, less is a brisker drill. */
    private readonly pace = 1,
    private readonly habits: CrewHabits = USUAL_HABITS,
  ) {
    this.random = seededRandom(seed);
  }

  private chance(p: number): boolean {
    return this.random.next() < p;
  }

  private delay(medianMs: number): number {
    return Math.max(300, Math.round(humanDelayMs(this.random, medianMs) * this.pace));
  }

  /** Looks at the session again after anything happened: new duties get a new intent, old ones stand. */
  rethink(state: SessionState, nowMs: number): void {
    for (const member of this.members) {
      const next = nextStepFor(state, member.personId);
      const main = next.actions[0];
      if (!main || state.phase === 'finished') {
        this.intents.set(member.personId, null);
        continue;
      }
      const situation = situationOf(state, member, main);
      if (this.intents.get(member.personId)?.situation === situation) continue;
      // Their tap changed nothing (refused, say): like a person, they wait for something to happen.
      if (this.actedIn.get(member.personId) === situation) {
        this.intents.set(member.personId, null);
        continue;
      }
      this.intents.set(member.personId, this.intend(state, member, main, situation, nowMs));
    }
  }

  private intend(state: SessionState, member: PracticePerson, main: ActionType, situation: string, nowMs: number): Intent | null {
    let action = actionFor(main, state, member);
    if (!action) return null;
    const reAlertMs = state.settings.reAlertSeconds * 1000;
    const alerted = (activeLineSet(state)?.call?.alerts.find((a) => a.personId === member.personId)?.count ?? 0) > 0;
    let waitMs = this.delay(dutyMs(action, state));
    if (main === 'answer-clear' && !alerted) {
      if (this.chance(this.habits.forgets)) waitMs = Number.POSITIVE_INFINITY;
      else if (this.chance(this.habits.lateAnswer)) waitMs = reAlertMs + this.delay(3000);
    }
    // Now and then someone sees a reason to stop everything: a hold instead of their duty.
    if (state.phase === 'loading' && !state.hold && !this.holdCalled && member.role !== 'rail' && this.chance(this.habits.callsHold)) {
      const hold = sessionActionSchema.safeParse({ type: 'call-hold', reason: HOLD_REASONS[Math.floor(this.random.next() * HOLD_REASONS.length)] });
      if (hold.success && allowedActions(state, member.personId).includes('call-hold')) {
        this.holdCalled = true;
        action = hold.data;
        waitMs = this.delay(2000);
      }
    }
    const intent: Intent = { situation, dueMs: nowMs + waitMs, action };
    if (this.chance(this.habits.outOfOrder)) {
      const allowed = new Set(allowedActions(state, member.personId));
      const wrong = REPERTOIRE[member.role].filter((t) => !allowed.has(t));
      const type = wrong[Math.floor(this.random.next() * wrong.length)];
      const slip = type ? actionFor(type, state, member) : null;
      if (slip) {
        intent.slip = slip;
        intent.slipDueMs = nowMs + Math.min(this.delay(1500), Number.isFinite(waitMs) ? waitMs : Infinity);
      }
    }
    return intent;
  }

  /** The earliest moment a member means to tap, or null. */
  nextDueMs(): number | null {
    let due: number | null = null;
    for (const intent of this.intents.values()) {
      if (!intent) continue;
      const at = intent.slip ? intent.slipDueMs! : intent.dueMs;
      if (Number.isFinite(at) && (due === null || at < due)) due = at;
    }
    return due;
  }

  /** Takes the tap due first, at or before `untilMs`: the member, the action and when. */
  takeDue(untilMs: number): { member: PracticePerson; action: SessionAction; atMs: number } | null {
    let best: { member: PracticePerson; action: SessionAction; atMs: number; slip: boolean } | null = null;
    for (const member of this.members) {
      const intent = this.intents.get(member.personId);
      if (!intent) continue;
      const slip = !!intent.slip;
      const at = slip ? intent.slipDueMs! : intent.dueMs;
      if (at <= untilMs && (!best || at < best.atMs)) best = { member, action: slip ? intent.slip! : intent.action, atMs: at, slip };
    }
    if (!best) return null;
    const intent = this.intents.get(best.member.personId)!;
    if (best.slip) {
      delete intent.slip;
      delete intent.slipDueMs;
    } else {
      this.actedIn.set(best.member.personId, intent.situation);
      this.intents.set(best.member.personId, null);
    }
    return { member: best.member, action: best.action, atMs: best.atMs };
  }
}
