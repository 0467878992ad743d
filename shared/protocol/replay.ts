/**
 * Replay of a kept session: the state as it stood after any log entry, rebuilt by folding the logged
 * actions through the same `decide` the server used, from the plan alone (never from stored snapshots).
 *
 * Accepted entries do not store the action itself, so each entry kind is read back into the action
 * that wrote it (the entry holds every parameter that changed the state). One decision can write more
 * than one entry ("test recorded" then "finished"): the first stands for the action, the rest are
 * checked against what the replayed decision wrote. Refusals never changed the state and are skipped.
 */
import { ROLES } from './roles';
import {
  SYSTEM_ACTOR, createSessionState, decide,
  type Actor, type AnyAction, type LogEntry, type ProxyClearVia, type SessionState, type TestResult,
} from './session';

/** The session as it stood before its first action: the plan of every line set, the settings. */
export function initialStateOf(state: SessionState): SessionState {
  return createSessionState({
    lineSets: state.lineSets.map((ls) => ({
      id: ls.id,
      name: ls.name,
      // Correction steps are added during the session (plan-correction): the plan is what came before them.
      steps: ls.corrections?.length ? ls.steps.slice(0, ls.corrections[0].fromStep) : ls.steps,
      load: ls.startLoad,
      brickTypes: ls.brickTypes,
      ropeLockLimitKg: ls.ropeLockLimitKg,
      pieceNames: ls.pieceNames,
    })),
    settings: state.settings,
  });
}

const text = (v: unknown): string | undefined => (typeof v === 'string' && v.length > 0 ? v : undefined);

/**
 * The action an accepted entry stands for; null for entries no person's action writes first
 * (the opening entry, "finished", refusals).
 */
export function actionOfEntry(entry: LogEntry): AnyAction | null {
  const d = entry.details;
  switch (entry.kind) {
    case 'joined':
      return entry.role && entry.role !== 'system' ? { type: 'join', role: entry.role } : null;
    case 'left': return { type: 'leave' };
    case 'began': return { type: 'begin', shortCrewReason: text(d.shortCrewReason) };
    case 'move-called': return { type: 'call-move' };
    case 'clear-answered': return { type: 'answer-clear' };
    case 'clear-recorded-for':
      return { type: 'record-clear-for', personId: Number(d.forPersonId), via: d.via as ProxyClearVia };
    case 'locked': return { type: 'confirm-locked' };
    case 'tied-off': return { type: 'confirm-tie-off' };
    case 'rail-clear-called': return { type: 'call-clear-rail' };
    case 'rail-clear-confirmed': return { type: 'confirm-rail-clear' };
    case 'step-confirmed': return { type: 'confirm-step', stepIndex: entry.stepIndex ?? -1 };
    case 'loading-complete': return { type: 'call-loading-complete' };
    case 'untied': return { type: 'confirm-untie' };
    case 'correction-planned': return { type: 'plan-correction', lineSetId: entry.lineSetId ?? undefined };
    case 'test-recorded':
      return {
        type: 'record-test',
        result: d.result as TestResult,
        estimateKg: typeof d.estimateKg === 'number' ? d.estimateKg : undefined,
        note: text(d.note),
        tiedOff: d.tiedOff === true,
        lineSetId: entry.lineSetId ?? undefined,
      };
    case 'hold-called': return { type: 'call-hold', reason: text(d.reason) };
    case 'hold-reason-given': return { type: 'give-hold-reason', reason: String(d.reason ?? '') };
    case 'hold-acknowledged': return { type: 'ack-hold' };
    case 'hold-released': return { type: 'release-hold' };
    case 'note': return { type: 'note', text: String(d.text ?? '') };
    case 'ended': return { type: 'end', reason: String(d.reason ?? '') };
    case 're-alerted':
      return { type: 're-alert', personIds: (d.people as Array<{ personId: number }>).map((p) => p.personId) };
    default: return null;
  }
}

/** Who wrote the entry, as `decide` needs them. The roles they held then were enough: the log says so. */
function actorOfEntry(entry: LogEntry): Actor {
  if (entry.role === 'system' || entry.personId === null) return SYSTEM_ACTOR;
  return { personId: entry.personId, name: entry.personName, venueRoles: [...ROLES] };
}

export interface ReplayResult {
  /** `states[i]` is the session after `entries[i]`. */
  states: SessionState[];
  /** The first entry the rules would not have written as logged (a record that was not made by Railcall's rules). */
  mismatch: { seq: number; problem: string } | null;
}

/**
 * Folds the log through `decide`, from the plan. Stops rebuilding at the first entry the rules disagree
 * with, and says which; every later state is the last one that could be rebuilt.
 */
export function replaySession(initial: SessionState, entries: LogEntry[]): ReplayResult {
  const states: SessionState[] = [];
  let state = initial;
  let mismatch: ReplayResult['mismatch'] = null;
  /** Kinds the last decision wrote that are still to come in the log. */
  let pending: string[] = [];
  for (const entry of entries) {
    if (mismatch) {
      states.push(state);
      continue;
    }
    if (pending.length) {
      const expected = pending.shift();
      if (expected !== entry.kind) mismatch = { seq: entry.seq, problem: `the rules wrote "${expected}" here, the log "${entry.kind}"` };
      states.push(state);
      continue;
    }
    const action = actionOfEntry(entry);
    if (!action) {
      if (entry.kind !== 'session-opened' && entry.kind !== 'refused') {
        mismatch = { seq: entry.seq, problem: `"${entry.kind}" does not follow from any action` };
      }
      states.push(state);
      continue;
    }
    const decision = decide(state, action, actorOfEntry(entry), entry.serverTimeMs);
    if (!decision.ok) {
      mismatch = { seq: entry.seq, problem: `the rules refuse it here: ${decision.reason}` };
    } else if (decision.entries[0].kind !== entry.kind) {
      mismatch = { seq: entry.seq, problem: `the rules wrote "${decision.entries[0].kind}" here, the log "${entry.kind}"` };
    } else {
      state = decision.state;
      pending = decision.entries.slice(1).map((e) => e.kind);
    }
    states.push(state);
  }
  return { states, mismatch };
}
