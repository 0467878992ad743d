/**
 * Read-only views of a session for the role screens, the log table and the server's re-alert timer.
 * `allowedActions` asks `decide` itself, so a phone never offers a button the server would refuse.
 */
import { formatMass, type Units } from '../../rigging';
import { ROLE_LABELS, type SessionRole } from '../roles';
import { decide, type LogDraft } from './machine';
import { ACTION_TYPES, type ActionType, type SessionAction } from './schema';
import {
  activeLineSet,
  correctionOf,
  crewShortfall,
  nextWorkStepIndex,
  notYetClear,
  participantOf,
  type Participant,
  type SessionState,
} from './state';
import { balanceText, bricksText, capital, holdText, lineSetLabel, nameList, sessionDuty, stepText } from './words';

export interface Named {
  personId: number;
  name: string;
  role: SessionRole;
}
const named = (p: Participant): Named => ({ personId: p.personId, name: p.name, role: p.role });

/** A stand-in action of each type, for asking decide whether the type is allowed now. */
function probe(type: ActionType, state: SessionState, me: Participant): SessionAction {
  const ls = activeLineSet(state);
  switch (type) {
    case 'join':
      return { type, role: me.role };
    case 'begin':
      return { type, shortCrewReason: crewShortfall(state).length ? 'probe' : undefined };
    case 'confirm-step':
      return { type, stepIndex: ls ? Math.max(0, nextWorkStepIndex(ls)) : 0 };
    case 'record-test':
      return { type, result: 'balanced' };
    case 'plan-correction': {
      const flagged = state.lineSets.find((l) => l.flagged && l.stage === 'tested');
      return { type, ...(flagged ? { lineSetId: flagged.id } : {}) };
    }
    case 'record-clear-for': {
      // The first silent person Railcall has re-alerted: the one the lead could answer for.
      const alerted = new Set(ls?.call?.alerts.filter((a) => a.count > 0).map((a) => a.personId));
      const silent = notYetClear(state).find((p) => alerted.has(p.personId));
      return { type, personId: silent?.personId ?? 1, via: 'voice' };
    }
    case 'call-hold':
      return { type };
    case 'give-hold-reason':
      return { type, reason: 'probe' };
    case 'note':
      return { type, text: 'probe' };
    case 'end':
      return { type, reason: 'probe' };
    default:
      return { type } as SessionAction;
  }
}

/**
 * The action types this person may send now, for the buttons on their screen.
 * A person who has not joined may only join (their venue roles are checked when they do; during a
 * hold, only a rail operator when nobody leads).
 * `begin` is listed when it is allowed with a reason; `crewShortfall` says whether one is needed.
 * `confirm-step` is for the next step (nextStepFor gives its index).
 */
export function allowedActions(state: SessionState, personId: number): ActionType[] {
  const me = participantOf(state, personId);
  if (!me) {
    // During a hold only a rail operator may join, and only when nobody leads (to release it).
    const canJoin = state.phase !== 'finished' && (!state.hold || state.leadPersonId === null);
    return canJoin ? ['join'] : [];
  }
  const actor = { personId, name: me.name, venueRoles: [me.role] };
  return ACTION_TYPES.filter((type) => decide(state, probe(type, state, me), actor, 0).ok);
}

export interface Waiting {
  /** One sentence: who must do what now. */
  text: string;
  /** The people the session waits on, by name (those who must answer "clear", or the one who acts next). */
  people: Named[];
}

/** Who the session waits on now, and for what. The caller's screen shows `people` as the unanswered list. */
export function waitingOn(state: SessionState): Waiting {
  const lead = state.participants.find((p) => p.personId === state.leadPersonId);
  const leadList = lead ? [named(lead)] : [];
  const byRole = (role: SessionRole) => state.participants.filter((p) => p.role === role).map(named);
  if (state.phase === 'finished') return { text: 'The session has finished.', people: [] };
  if (state.hold) return { text: holdText(state.hold), people: leadList };
  const text = `${sessionDuty(state)}.`;
  if (state.phase === 'gathering') return { text, people: state.leadPersonId === null ? [] : crewShortfall(state).length ? [] : leadList };
  const ls = activeLineSet(state);
  if (!ls) return { text, people: leadList };
  switch (ls.stage) {
    case 'move-called': {
      const silent = notYetClear(state);
      return { text, people: silent.length ? silent.map(named) : leadList };
    }
    case 'in-position':
      return { text, people: ls.needsTieOff && !ls.tiedOff ? leadList : byRole('loader') };
    case 'rail-clear': {
      const next = nextWorkStepIndex(ls);
      const kind = next >= 0 ? ls.steps[next].kind : null;
      return { text, people: kind === 'remove-piece' || kind === 'add-piece' ? byRole('deck') : byRole('loader') };
    }
    default:
      return { text, people: leadList };
  }
}

export interface NextStep {
  /** The main things this person may do now (holds, notes and leaving left out). */
  actions: ActionType[];
  /** One instruction for this person's screen. */
  text: string;
  /** The plan step this person confirms next, when it is theirs. */
  stepIndex?: number;
}

const SIDE_ACTIONS = new Set<ActionType>(['call-hold', 'give-hold-reason', 'note', 'leave', 'end', 'record-clear-for']);

/** What this person should do now, for their role screen ("Pull 2 bricks for Drape A, then confirm."). */
export function nextStepFor(state: SessionState, personId: number): NextStep {
  const allowed = allowedActions(state, personId);
  const actions = allowed.filter((a) => !SIDE_ACTIONS.has(a));
  const me = participantOf(state, personId);
  const ls = activeLineSet(state);
  const label = ls ? lineSetLabel(ls.name) : '';
  const main = actions[0];
  if (state.phase === 'finished') {
    // Nothing is left to do: no "Wait.", no corrections offered.
    return {
      actions: [],
      text: state.endedHow === 'ended' ? `The session was ended early: "${state.endReason}".` : 'The session has finished: every line set is tested in balance.',
    };
  }
  if (!me) return { actions, text: main === 'join' ? 'Join the session in your role.' : 'The session has finished.' };
  const say = (text: string, stepIndex?: number): NextStep => ({ actions, text, ...(stepIndex !== undefined ? { stepIndex } : {}) });
  switch (main) {
    case 'ack-hold':
      return say(`${holdText(state.hold!)} Acknowledge it.`);
    case 'release-hold':
      return say(`${holdText(state.hold!)} Release it when it is safe.`);
    case 'begin':
      return say(crewShortfall(state).length ? 'The minimum crew has not joined: wait, or begin short with a reason.' : 'Begin loading.');
    case 'call-move':
      return say(`Call ${lineSetLabel(state.lineSets.find((l) => l.stage === 'waiting')!.name)} in to the loading position.`);
    case 'answer-clear':
      return say(`${capital(label)} is coming in: look around, get clear, and answer "clear".`);
    case 'confirm-locked':
      return say(`Everyone has answered "clear": confirm ${label} is in position and locked.`);
    case 'confirm-tie-off':
      return say(`Tie off ${label} at the rail, then confirm.`);
    case 'call-clear-rail':
      return say('Call to clear the rail.');
    case 'confirm-rail-clear':
      return say(
        ls?.tiedOff
          ? 'Step at least 10 ft back from the rail and out from under the gallery, watch the rail and the tie-off from there, then confirm.'
          : 'Step at least 10 ft back from the rail and out from under the gallery, keep watch, then confirm.',
      );
    case 'confirm-step': {
      const i = nextWorkStepIndex(ls!);
      return say(`${capital(stepText(ls!, i))}, then confirm.`, i);
    }
    case 'call-loading-complete':
      return say('Every step is done: call "loading complete".');
    case 'confirm-untie':
      return say(`Return to the rail, untie ${label}, then confirm.`);
    case 'record-test':
      return say(ls && correctionOf(ls, ls.steps.length - 1) ? `The correction is done: test the balance of ${label} again and record the result.` : `Test the balance of ${label} and record the result.`);
    case 'plan-correction': {
      const flagged = state.lineSets.filter((l) => l.flagged && l.stage === 'tested').map((l) => lineSetLabel(l.name));
      return say(`${capital(nameList(flagged))} tested out of balance: work out the correction, or end the session.`);
    }
    default: {
      if (me.role === 'rail' && ls?.stage === 'rail-clear') {
        return say(
          ls.tiedOff
            ? 'Watch the rail and the tie-off from at least 10 ft back, out from under the gallery, until the loaders call "loading complete".'
            : 'Stay at least 10 ft back from the rail and keep watch until the loaders call "loading complete".',
        );
      }
      return say(`Wait. ${waitingOn(state).text}`);
    }
  }
}

export interface SilentPerson extends Named {
  /** How long since the call, the last re-alert or the last hold release, whichever is latest (ms). */
  silentForMs: number;
  /** How many times Railcall has re-alerted this person for this call. */
  reAlerts: number;
  /** When this person is next due a re-alert (ms since 1970, server clock). */
  nextReAlertAtMs: number;
  /** True once the venue's re-alert time has passed: re-alert them now. */
  due: boolean;
}

/**
 * Everyone joined who has not yet acknowledged the hold that is on, for the rail's screen. The caller
 * counts as acknowledged; the lead is not waited on (the lead releases the hold).
 */
export function holdNotAcknowledged(state: SessionState): Named[] {
  if (!state.hold) return [];
  const acked = new Set(state.hold.acks.map((a) => a.personId));
  return state.participants.filter((p) => !acked.has(p.personId) && p.personId !== state.leadPersonId).map(named);
}

/**
 * The silent people whose "clear" this person (the lead) may record now, having heard it another way:
 * each asked of `decide`, so the rail screen offers exactly what the server accepts.
 */
export function proxyClearCandidates(state: SessionState, personId: number): Named[] {
  const me = participantOf(state, personId);
  if (!me) return [];
  const actor = { personId, name: me.name, venueRoles: [me.role] };
  return notYetClear(state)
    .filter((p) => decide(state, { type: 'record-clear-for', personId: p.personId, via: 'voice' }, actor, 0).ok)
    .map(named);
}

/**
 * The people who still owe a "clear" to the open move call, with how long they have been silent.
 * The server's timer re-alerts everyone `due` (system action `re-alert`), then sleeps until
 * `nextReAlertAtMs(state)`. Silence counts from the call, the person's last re-alert, the end of the
 * last hold, or when they joined, whichever is latest. Nobody is due during a hold (the hold stops everything).
 */
export function silentSince(state: SessionState, nowMs: number): SilentPerson[] {
  const ls = activeLineSet(state);
  if (state.hold || state.phase !== 'loading' || !ls?.call || ls.stage !== 'move-called') return [];
  const periodMs = state.settings.reAlertSeconds * 1000;
  return notYetClear(state).map((p) => {
    const alert = ls.call!.alerts.find((a) => a.personId === p.personId);
    const fromMs = Math.max(ls.call!.calledAtMs, alert?.lastMs ?? 0, state.lastHoldReleasedAtMs ?? 0, p.joinedAtMs);
    return {
      ...named(p),
      silentForMs: Math.max(0, nowMs - fromMs),
      reAlerts: alert?.count ?? 0,
      nextReAlertAtMs: fromMs + periodMs,
      due: nowMs - fromMs >= periodMs,
    };
  });
}

/** When the server's re-alert timer should next fire, or null when nobody owes an answer. */
export function nextReAlertAtMs(state: SessionState): number | null {
  const silent = silentSince(state, 0);
  return silent.length ? Math.min(...silent.map((p) => p.nextReAlertAtMs)) : null;
}

/** What a person tried to do, in the words of the log ("tried to record a test"). */
const ACTION_WORDS: Record<ActionType, string> = {
  join: 'join',
  leave: 'leave',
  begin: 'begin loading',
  'call-move': 'call a line set in',
  'answer-clear': 'answer "clear"',
  'record-clear-for': 'record a "clear" for someone else',
  'confirm-locked': 'confirm a line set in and locked',
  'confirm-tie-off': 'confirm a tie-off',
  'call-clear-rail': 'call to clear the rail',
  'confirm-rail-clear': 'confirm the rail is clear',
  'confirm-step': 'confirm a step',
  'call-loading-complete': 'call "loading complete"',
  'confirm-untie': 'confirm untying',
  'record-test': 'record a test of balance',
  'plan-correction': 'work out a correction',
  'call-hold': 'call a hold',
  'give-hold-reason': 'say why the hold was called',
  'ack-hold': 'acknowledge the hold',
  'release-hold': 'release the hold',
  note: 'add a note',
  end: 'end the session',
};

/** A log entry as the table shows it: the draft plus the person's name (LogEntry has both). */
export type DescribableEntry = Omit<LogDraft, 'lineSetId' | 'stepIndex'> & {
  lineSetId?: string | null;
  stepIndex?: number | null;
  personName?: string;
};

/**
 * One plain sentence for a log entry ("Jo Castellan called line set 7 in to the loading position.").
 * Line set names come from the entry's details, else from `state`, else the id.
 */
export function describeEntry(entry: DescribableEntry, state?: SessionState, unitsAsked?: Units): string {
  // The venue's units as the session keeps them, unless the reader asks for others (a session stored before it kept them: kg).
  const units = unitsAsked ?? state?.settings.units;
  const who = entry.role === 'system' ? 'Railcall' : (entry.personName ?? 'Someone');
  const d = entry.details as Record<string, any>;
  const lsName: string | undefined =
    d.lineSetName ?? state?.lineSets.find((l) => l.id === entry.lineSetId)?.name ?? entry.lineSetId;
  const label = lsName ? lineSetLabel(lsName) : 'the line set';
  const roleWord = entry.role && entry.role !== 'system' ? ROLE_LABELS[entry.role].toLowerCase() : '';
  switch (entry.kind) {
    case 'joined':
      return `${who} joined as ${roleWord}${d.lead ? ' and leads the session' : ''}.`;
    case 'left':
      return `${who} left the session.${d.newLeadName ? ` ${d.newLeadName} now leads.` : d.newLeadPersonId === null ? ' Nobody leads until a rail operator joins.' : ''}`;
    case 'began':
      return d.shortCrewReason
        ? `${who} began loading short of the minimum crew: "${d.shortCrewReason}".`
        : `${who} began loading.`;
    case 'move-called':
      return `${who} called ${label} in to the loading position.`;
    case 'clear-answered':
      return `${who} answered "clear" for ${label}.`;
    case 'clear-recorded-for': {
      const times = Number(d.reAlerts) === 1 ? 'once' : `${d.reAlerts} times`;
      return `${who} recorded "clear" for ${d.forName} on ${label}: ${d.forName} ${d.viaText ?? 'answered clear another way'}, not by phone (Railcall had re-alerted ${d.forName} ${times}).`;
    }
    case 'locked':
      return `${who} confirmed ${label} is in position and locked.`;
    case 'tied-off':
      return `${who} tied off ${label} at the rail.`;
    case 'rail-clear-called':
      return `${who} called to clear the rail for ${label}.`;
    case 'rail-clear-confirmed':
      return `${who} confirmed the rail is clear for ${label} (stepped back at least 10 ft, keeping watch).`;
    case 'step-confirmed':
      return `${who} ${d.text ?? `confirmed step ${(entry.stepIndex ?? 0) + 1}`} on ${label}: now ${balanceText(Number(d.imbalanceKg), units)}.`;
    case 'loading-complete':
      return `${who} called "loading complete" on ${label}.`;
    case 'untied':
      return `${who} untied ${label}.`;
    case 'test-recorded': {
      const result = d.result === 'balanced' ? 'balanced' : `${d.result} by about ${units ? formatMass(Number(d.estimateKg), units) : `${d.estimateKg} kg`}`;
      const note = d.note ? ` ("${d.note}")` : '';
      const flag = d.flagCleared ? ' The flag is cleared.' : d.flagged ? ' It stays flagged until corrected.' : '';
      const tie = d.tiedOff ? ' It is tied off at the rail.' : d.untied ? ' The tie-off is undone.' : '';
      const computed = d.computedImbalanceKg === undefined || d.result === 'balanced' ? '' : ` (computed: ${balanceText(Number(d.computedImbalanceKg), units)})`;
      return `${who} tested ${label}${d.afterCorrection ? ' after its correction' : ''}: ${result}${computed}${note}.${flag}${tie}`;
    }
    case 'correction-planned': {
      const steps = Array.isArray(d.steps) ? (d.steps as Array<{ kind: string; bricks?: Record<string, number> }>) : [];
      const bricks = steps.find((x) => x.kind === 'add-bricks' || x.kind === 'remove-bricks');
      const what = bricks ? `${bricks.kind === 'add-bricks' ? 'load' : 'pull'} ${bricksText(bricks.bricks, Object.keys(bricks.bricks ?? {}).length)}` : 'no bricks';
      return `${who} worked out the correction for ${label} from the test (measured ${balanceText(Number(d.measuredKg), units)}, computed ${balanceText(Number(d.computedKg), units)}): ${what}, then test again.`;
    }
    case 'hold-called':
      return `${who} called a hold${d.reason ? `: "${d.reason}"` : ''}.`;
    case 'hold-reason-given':
      return `${who} said why the hold was called: "${d.reason}".`;
    case 'hold-acknowledged':
      return `${who} acknowledged the hold.`;
    case 'hold-released':
      return `${who} released the hold.`;
    case 'note':
      return `${who} noted: "${d.text}".`;
    case 'ended': {
      const left = Array.isArray(d.leftAs)
        ? d.leftAs.map((l: { name: string; outcome: string }) => ` ${capital(lineSetLabel(l.name))}: ${l.outcome}.`).join('')
        : '';
      return `${who} ended the session: "${d.reason}".${left}`;
    }
    case 'finished':
      return 'Every line set is tested in balance: the session is finished.';
    case 're-alerted': {
      const people = Array.isArray(d.people) ? d.people.map((p: { name: string }) => p.name) : [];
      return `Railcall re-alerted ${nameList(people)}: no "clear" yet for ${label}.`;
    }
    case 'session-opened':
      return `${who} opened the session "${d.title}" for ${nameList((d.lineSets ?? []).map((l: { name: string }) => l.name))}.`;
    case 'refused':
      return `${who} tried to ${ACTION_WORDS[d.action?.type as ActionType] ?? 'act'} and was refused: ${d.reason}`;
    default:
      return `${who}: ${entry.kind}.`;
  }
}
