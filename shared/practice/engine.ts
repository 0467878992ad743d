/**
 * A practice session: the real rules (`decide`) run on the phone against a simulated crew. Nothing
 * here touches a venue's schedule, stock or log: the practice keeps its own taps and log, and the
 * server, given the taps, plays them again through the same rules to keep the training record.
 */
import type { Units } from '../rigging';
import {
  SYSTEM_ACTOR,
  createSessionState,
  decide,
  describeEntry,
  nextReAlertAtMs,
  silentSince,
  type AnyAction,
  type CreateSessionInput,
  type LogDraft,
  type RefusalCode,
  type SessionState,
} from '../protocol/session';
import { SimulatedCrew, type CrewHabits, USUAL_HABITS } from './crew';
import { practiceCrew, type PracticePerson, type PracticeRole } from './people';

/** One tap of a practice session: the person practising, a simulated member, or Railcall (id 0). */
export interface PracticeTap {
  atMs: number;
  personId: number;
  action: AnyAction;
}

/** One line of the practice log. */
export interface PracticeEntry {
  seq: number;
  atMs: number;
  /** null for Railcall itself. */
  personId: number | null;
  personName: string;
  role: LogDraft['role'];
  simulated: boolean;
  kind: string;
  lineSetId?: string;
  stepIndex?: number;
  details: Record<string, unknown>;
  /** Set on a refused tap: why, in the rules' words. */
  refusal?: { code: RefusalCode; reason: string; actionType: string };
}

export interface PracticeSetup {
  title: string;
  role: PracticeRole;
  you: { personId: number; name: string };
  session: CreateSessionInput;
}

/** Every practice sentence says it is practice. */
export const PRACTICE_PREFIX = 'Practice: ';

export function practiceSentence(entry: PracticeEntry, state?: SessionState, units?: Units): string {
  return PRACTICE_PREFIX + describeEntry(entry, state, units);
}

function actorOf(people: readonly PracticePerson[], personId: number) {
  if (personId === SYSTEM_ACTOR.personId) return SYSTEM_ACTOR;
  const person = people.find((p) => p.personId === personId);
  if (!person) throw new Error(`Nobody with id ${personId} takes part in this practice.`);
  // In practice everyone may play the role they were given, whatever they hold at the venue.
  return { personId: person.personId, name: person.name, venueRoles: [person.role] };
}

/** Applies one tap with the shared rules: the next state (unchanged when refused) and its log lines. */
export function applyPracticeTap(
  state: SessionState,
  tap: PracticeTap,
  people: readonly PracticePerson[],
  nextSeq: number,
): { state: SessionState; entries: PracticeEntry[]; ok: boolean } {
  const actor = actorOf(people, tap.personId);
  const decision = decide(state, tap.action, actor, tap.atMs);
  const person = people.find((p) => p.personId === tap.personId);
  const line = (draft: LogDraft, i: number): PracticeEntry => {
    const system = draft.role === 'system' || tap.personId === SYSTEM_ACTOR.personId;
    return {
      seq: nextSeq + i,
      atMs: tap.atMs,
      personId: system ? null : tap.personId,
      personName: system ? 'Railcall' : actor.name,
      role: draft.role ?? null,
      simulated: !system && !!person?.simulated,
      kind: draft.kind,
      ...(draft.lineSetId !== undefined ? { lineSetId: draft.lineSetId } : {}),
      ...(draft.stepIndex !== undefined ? { stepIndex: draft.stepIndex } : {}),
      details: draft.details,
    };
  };
  if (!decision.ok) {
    const entry = line(decision.entry, 0);
    entry.refusal = { code: decision.code, reason: decision.reason, actionType: tap.action.type };
    return { state, entries: [entry], ok: false };
  }
  return { state: decision.state, entries: decision.entries.map(line), ok: true };
}

export interface PracticeReplay {
  state: SessionState;
  log: PracticeEntry[];
  /** The state after each tap, in order (for the debrief and a replay). */
  states: SessionState[];
}

/** Plays a practice session's taps again from its setup. Deterministic: the same taps, the same log. */
export function replayPractice(setup: PracticeSetup, taps: readonly PracticeTap[]): PracticeReplay {
  const people = practiceCrew(setup.you, setup.role);
  let state = createSessionState(setup.session);
  const log: PracticeEntry[] = [];
  const states: SessionState[] = [];
  for (const tap of taps) {
    const result = applyPracticeTap(state, tap, people, log.length + 1);
    state = result.state;
    log.push(...result.entries);
    states.push(state);
  }
  return { state, log, states };
}

/** Most taps one `advance` will play, so a crew that keeps getting refused cannot spin forever. */
const MAX_TAPS_PER_ADVANCE = 200;

/**
 * A practice session in progress. The phone calls `advance(now)` on a timer (the simulated crew and
 * Railcall's re-alerts play out in time order up to now) and `tap(action, now)` when the person taps.
 */
export class PracticeEngine {
  readonly people: PracticePerson[];
  readonly you: PracticePerson;
  readonly taps: PracticeTap[] = [];
  readonly log: PracticeEntry[] = [];
  state: SessionState;
  readonly startedAtMs: number;
  stoppedAtMs: number | null = null;
  private readonly crew: SimulatedCrew;

  constructor(
    readonly setup: PracticeSetup,
    readonly seed: number,
    startMs: number,
    options: { pace?: number; habits?: CrewHabits } = {},
  ) {
    this.people = practiceCrew(setup.you, setup.role);
    this.you = this.people.find((p) => !p.simulated)!;
    this.state = createSessionState(setup.session);
    this.startedAtMs = startMs;
    this.crew = new SimulatedCrew(this.people.filter((p) => p.simulated), seed, options.pace ?? 1, options.habits ?? USUAL_HABITS);
    // Everyone is at the session from the start; the rail operator joins first and leads.
    for (const person of this.people) this.play({ atMs: startMs, personId: person.personId, action: { type: 'join', role: person.role } });
    this.crew.rethink(this.state, startMs);
  }

  get finished(): boolean {
    return this.state.phase === 'finished' || this.stoppedAtMs !== null;
  }

  private play(tap: PracticeTap): PracticeEntry[] {
    const result = applyPracticeTap(this.state, tap, this.people, this.log.length + 1);
    this.taps.push(tap);
    this.state = result.state;
    this.log.push(...result.entries);
    return result.entries;
  }

  private reAlertDueMs(): number | null {
    return this.state.phase === 'loading' ? nextReAlertAtMs(this.state) : null;
  }

  /** Plays what the simulated crew and Railcall do up to `nowMs`; returns the new log lines. */
  advance(nowMs: number): PracticeEntry[] {
    const added: PracticeEntry[] = [];
    for (let n = 0; n < MAX_TAPS_PER_ADVANCE && !this.finished; n += 1) {
      const crewAt = this.crew.nextDueMs();
      const alertAt = this.reAlertDueMs();
      const at = Math.min(crewAt ?? Infinity, alertAt ?? Infinity);
      if (!(at <= nowMs)) break;
      if (alertAt !== null && alertAt === at) {
        const due = silentSince(this.state, at).filter((p) => p.due).map((p) => p.personId);
        if (due.length === 0) break;
        added.push(...this.play({ atMs: at, personId: SYSTEM_ACTOR.personId, action: { type: 're-alert', personIds: due } }));
      } else {
        const next = this.crew.takeDue(at)!;
        added.push(...this.play({ atMs: next.atMs, personId: next.member.personId, action: next.action }));
      }
      this.crew.rethink(this.state, at);
    }
    return added;
  }

  /** The person practising taps: the crew's earlier moves play first, then the tap, decided by the rules. */
  tap(action: AnyAction, nowMs: number): { entries: PracticeEntry[]; ok: boolean } {
    if (this.finished) return { entries: [], ok: false };
    const atMs = Math.max(nowMs, this.taps.at(-1)?.atMs ?? nowMs);
    this.advance(atMs);
    const entries = this.play({ atMs, personId: this.you.personId, action });
    this.crew.rethink(this.state, atMs);
    return { entries, ok: !entries[0]?.refusal };
  }

  /** When something is next due to happen on its own (a crew tap or a re-alert), or null. */
  nextWakeMs(): number | null {
    if (this.finished) return null;
    const times = [this.crew.nextDueMs(), this.reAlertDueMs()].filter((t): t is number => t !== null);
    return times.length ? Math.min(...times) : null;
  }

  /** The person stops the practice before the end; the debrief covers what was done. */
  stop(nowMs: number): void {
    if (!this.finished) this.stoppedAtMs = Math.max(nowMs, this.taps.at(-1)?.atMs ?? nowMs);
  }

  /** When the practice ended: finished by the rules, stopped, or null while it runs. */
  get endedAtMs(): number | null {
    return this.state.endedAtMs ?? this.stoppedAtMs;
  }
}

/**
 * What is wrong with a practice's taps as a phone sent them, or null: taps in time order, only by the
 * practice's own people, and Railcall's re-alerts only when one was due. The rules themselves then
 * decide every tap again (a refused tap is kept as refused, like a real one).
 */
export function practiceTapProblem(setup: PracticeSetup, taps: readonly PracticeTap[]): string | null {
  const people = practiceCrew(setup.you, setup.role);
  let state = createSessionState(setup.session);
  let lastMs = taps[0]?.atMs ?? 0;
  for (const [i, tap] of taps.entries()) {
    const where = `Tap ${i + 1}`;
    if (tap.atMs < lastMs) return `${where} is earlier than the one before it.`;
    lastMs = tap.atMs;
    if (tap.personId === SYSTEM_ACTOR.personId) {
      if (tap.action.type !== 're-alert') return `${where}: Railcall itself only re-alerts.`;
      const due = new Set(silentSince(state, tap.atMs).filter((p) => p.due).map((p) => p.personId));
      if (!tap.action.personIds.every((id) => due.has(id))) return `${where}: a re-alert before it was due.`;
    } else {
      if (!people.some((p) => p.personId === tap.personId)) return `${where}: nobody with that id takes part in this practice.`;
      if (tap.action.type === 're-alert') return `${where}: only Railcall re-alerts.`;
    }
    state = applyPracticeTap(state, tap, people, 1).state;
  }
  return null;
}
