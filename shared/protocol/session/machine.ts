/**
 * The rules of a live loading session, as a typed transition table and one pure reducer, `decide`.
 *
 * Why a table and not a state-machine library (XState): every refusal must tell the person what has
 * to happen first ("The loaders must pull 2 bricks for Drape A first."), and the state is plain JSON
 * kept in one database column and sent whole to phones. A table of rules, each a guard that either
 * refuses with a sentence or changes a copy of the state, says both directly; a statechart would
 * drop those reasons (a rejected event is silently ignored) and keep its own snapshot format.
 *
 * Each rule names who may send the action (`who`), whether it is done at the rail (`atRail`: refused
 * while the rail is clear for loading), and its effect. `decide` applies the checks every action
 * shares, in this order, then the rule's own:
 *   1. the session has finished → refused;
 *   2. a hold is on → refused unless it is acknowledging or releasing it;
 *   3. the person has not joined → forbidden (except `join`);
 *   4. the person's role does not fit (`who`) or the venue no longer gives them that role → forbidden;
 *   5. a rail-side action while the rail is clear → refused;
 *   6. the rule's own order checks → refused (or already-done for something that already happened).
 *
 * One lead: the first person to join in the rail role leads the session. Only the lead acts at the
 * rail, begins, releases holds and ends; any further rail operators watch, note and call holds like
 * stage managers. Before loading begins, a leaving lead hands the lead to the next rail operator who
 * joined; once loading has begun the lead cannot leave (end the session with a reason instead).
 */
import { applyStep, formatMass, loadImbalanceKg } from '../../rigging';
import { ROLE_LABELS, type SessionRole } from '../roles';
import type { SessionAction, SystemAction } from './schema';
import {
  SYSTEM_ACTOR,
  activeLineSet,
  crewShortfall,
  isWorkStep,
  nextWorkStepIndex,
  notYetClear,
  participantOf,
  type Actor,
  type LineSetState,
  type Participant,
  type SessionState,
} from './state';
import { balanceText, capital, holdText, lineSetDuty, lineSetLabel, nameList, sessionDuty, shortText, stepDuty, stepRole, stepText } from './words';

/** What the server appends to the log for one decision (it adds seq, times, person, hash). */
export interface LogDraft {
  kind: string;
  lineSetId?: string;
  stepIndex?: number;
  /** The session role the person acted in ('system' for Railcall itself; null when not joined). */
  role?: SessionRole | 'system' | null;
  details: Record<string, unknown>;
}

export type RefusalCode = 'refused' | 'forbidden' | 'already-done';

export type Decision =
  | { ok: true; state: SessionState; entries: LogDraft[] }
  | { ok: false; code: RefusalCode; reason: string; entry: LogDraft };

/** Any action decide accepts: a person's, or Railcall's own. */
export type AnyAction = SessionAction | SystemAction;

interface Refusal {
  ok: false;
  code: RefusalCode;
  reason: string;
  lineSetId?: string;
  stepIndex?: number;
}
type Outcome = { ok: true; entries: LogDraft[] } | Refusal;

const refuse = (reason: string, extra: Partial<Refusal> = {}): Refusal => ({ ok: false, code: 'refused', reason, ...extra });
const forbid = (reason: string): Refusal => ({ ok: false, code: 'forbidden', reason });
const alreadyDone = (reason: string, extra: Partial<Refusal> = {}): Refusal => ({ ok: false, code: 'already-done', reason, ...extra });
const first = (duty: string) => `${duty} first.`;

/** Everything a rule sees. `state` is the decision's own copy: rules change it freely. */
interface Ctx<A extends AnyAction> {
  state: SessionState;
  action: A;
  actor: Actor;
  /** The actor as a participant; set for every rule except join and system actions. */
  me: Participant;
  nowMs: number;
}

/** Who may send an action: anyone (join), the lead, Railcall itself, any joined person, or these roles. */
type Who = 'anyone' | 'lead' | 'system' | 'joined' | readonly SessionRole[];

interface Rule<A extends AnyAction> {
  who: Who;
  /** Done at the rail: refused from "rail is clear" until "loading complete". */
  atRail: boolean;
  apply(ctx: Ctx<A>): Outcome;
}

type RuleTable = { [T in AnyAction['type']]: Rule<Extract<AnyAction, { type: T }>> };

const lineSetRef = (ls: LineSetState) => ({ lineSetId: ls.id, lineSetName: ls.name });

/** The active line set, or a refusal saying what must happen before there is one. */
function needActive(state: SessionState): LineSetState | Refusal {
  if (state.phase === 'gathering') return refuse(first(sessionDuty(state)));
  const ls = activeLineSet(state);
  return ls ?? refuse(first(sessionDuty(state)));
}
const isRefusal = (x: unknown): x is Refusal => typeof x === 'object' && x !== null && (x as Refusal).ok === false;

/** Refusal for an action that belongs to a stage: already past it, or not there yet. */
function wrongStage(state: SessionState, ls: LineSetState, past: boolean, doneText: string): Refusal {
  return past ? alreadyDone(doneText, { lineSetId: ls.id }) : refuse(first(lineSetDuty(state, ls)), { lineSetId: ls.id });
}

const STAGE_ORDER = ['waiting', 'move-called', 'in-position', 'rail-clear-called', 'rail-clear', 'loading-complete', 'tested'] as const;
const pastStage = (ls: LineSetState, stage: (typeof STAGE_ORDER)[number]) => STAGE_ORDER.indexOf(ls.stage) > STAGE_ORDER.indexOf(stage);

function markDone(ls: LineSetState, kind: 'tie-off' | 'untie' | 'test-balance') {
  ls.steps.forEach((s, i) => {
    if (s.kind === kind) ls.done[i] = true;
  });
}

/** The session finishes on its own when every line set has a test result and none is out of balance. */
function finishIfComplete(state: SessionState, nowMs: number): LogDraft[] {
  if (!state.lineSets.every((l) => l.stage === 'tested' && !l.flagged)) return [];
  state.phase = 'finished';
  state.endedAtMs = nowMs;
  state.endedHow = 'complete';
  return [{ kind: 'finished', role: 'system', details: { lineSets: state.lineSets.length } }];
}

export const RULES: RuleTable = {
  join: {
    who: 'anyone',
    atRail: false,
    apply({ state, action, actor, nowMs }) {
      const existing = participantOf(state, actor.personId);
      if (existing?.role === action.role) return alreadyDone(`You have already joined as ${ROLE_LABELS[action.role].toLowerCase()}.`);
      if (existing) {
        return refuse(`You joined as ${ROLE_LABELS[existing.role].toLowerCase()}: leave the session first to join as ${ROLE_LABELS[action.role].toLowerCase()}.`);
      }
      if (!actor.venueRoles.includes(action.role)) {
        return forbid(`You do not hold the ${ROLE_LABELS[action.role].toLowerCase()} role at this venue.`);
      }
      state.participants.push({ personId: actor.personId, name: actor.name, role: action.role, joinedAtMs: nowMs });
      const leads = action.role === 'rail' && state.leadPersonId === null;
      if (leads) state.leadPersonId = actor.personId;
      return { ok: true, entries: [{ kind: 'joined', role: action.role, details: { lead: leads } }] };
    },
  },

  leave: {
    who: 'joined',
    atRail: false,
    apply({ state, me }) {
      const isLead = state.leadPersonId === me.personId;
      if (isLead && state.phase === 'loading') {
        return refuse('The lead cannot leave while loading is under way: end the session with a reason first.');
      }
      state.participants = state.participants.filter((p) => p.personId !== me.personId);
      // A person who comes back must answer the open move call again.
      for (const ls of state.lineSets) {
        if (ls.call) ls.call.answers = ls.call.answers.filter((a) => a.personId !== me.personId);
      }
      const details: Record<string, unknown> = {};
      if (isLead) {
        const next = state.participants.find((p) => p.role === 'rail') ?? null;
        state.leadPersonId = next?.personId ?? null;
        details.newLeadPersonId = next?.personId ?? null;
        details.newLeadName = next?.name ?? null;
      }
      return { ok: true, entries: [{ kind: 'left', details }] };
    },
  },

  begin: {
    who: 'lead',
    atRail: false,
    apply({ state, action, nowMs }) {
      if (state.phase !== 'gathering') return alreadyDone('Loading has already begun.');
      const short = crewShortfall(state);
      if (short.length && !action.shortCrewReason) {
        return refuse(`The minimum crew has not joined (${shortText(short)}): wait for them, or give a reason to begin short.`);
      }
      state.phase = 'loading';
      state.beganAtMs = nowMs;
      state.shortCrewReason = short.length ? (action.shortCrewReason ?? null) : null;
      const crew = { rail: 0, loader: 0, deck: 0, 'stage-manager': 0 };
      for (const p of state.participants) crew[p.role] += 1;
      return {
        ok: true,
        entries: [{ kind: 'began', details: { crew, short, shortCrewReason: state.shortCrewReason } }],
      };
    },
  },

  'call-move': {
    who: 'lead',
    atRail: true,
    apply({ state, me, nowMs }) {
      if (state.phase === 'gathering') return refuse(first(sessionDuty(state)));
      const current = activeLineSet(state);
      if (current && current.stage !== 'tested') {
        return current.stage === 'move-called'
          ? alreadyDone(`${capital(lineSetLabel(current.name))} has already been called.`, { lineSetId: current.id })
          : refuse(first(lineSetDuty(state, current)), { lineSetId: current.id });
      }
      const nextIndex = state.lineSets.findIndex((l) => l.stage === 'waiting');
      if (nextIndex < 0) return alreadyDone('Every line set in this session has been called.');
      // A tie-off is never left unattended: the rail operator stays with a tied set until it is corrected.
      const tied = state.lineSets.find((l) => l.tiedOff);
      if (tied) {
        return refuse(`${capital(lineSetLabel(tied.name))} is tied off out of balance: correct it and record a balanced test before calling another set (a tie-off is never left unattended).`, { lineSetId: tied.id });
      }
      const ls = state.lineSets[nextIndex];
      state.activeIndex = nextIndex;
      ls.stage = 'move-called';
      ls.call = { calledAtMs: nowMs, byPersonId: me.personId, answers: [], alerts: [] };
      const mustAnswer = notYetClear(state).map((p) => p.name);
      return {
        ok: true,
        entries: [{ kind: 'move-called', lineSetId: ls.id, details: { ...lineSetRef(ls), direction: 'in', mustAnswer } }],
      };
    },
  },

  'answer-clear': {
    who: ['deck', 'loader'],
    atRail: false,
    apply({ state, me, nowMs }) {
      const ls = activeLineSet(state);
      if (ls && ls.stage !== 'tested' && pastStage(ls, 'move-called')) {
        return alreadyDone(`${capital(lineSetLabel(ls.name))} is already in position and locked.`, { lineSetId: ls.id });
      }
      if (!ls || ls.stage !== 'move-called' || !ls.call) {
        return refuse('No move has been called: there is nothing to answer yet.');
      }
      if (ls.call.answers.some((a) => a.personId === me.personId)) {
        return alreadyDone(`You have already answered "clear" for ${lineSetLabel(ls.name)}.`, { lineSetId: ls.id });
      }
      ls.call.answers.push({ personId: me.personId, name: me.name, atMs: nowMs });
      const stillWaitingOn = notYetClear(state).map((p) => p.name);
      return {
        ok: true,
        entries: [{ kind: 'clear-answered', lineSetId: ls.id, details: { ...lineSetRef(ls), stillWaitingOn } }],
      };
    },
  },

  'confirm-locked': {
    who: 'lead',
    atRail: true,
    apply({ state, nowMs }) {
      const ls = needActive(state);
      if (isRefusal(ls)) return ls;
      if (ls.stage !== 'move-called') {
        return wrongStage(state, ls, pastStage(ls, 'move-called'), `${capital(lineSetLabel(ls.name))} is already in position and locked.`);
      }
      const silent = notYetClear(state);
      if (silent.length) {
        return refuse(
          `Waiting for "clear" from ${nameList(silent.map((p) => p.name))}: nothing proceeds without their answers.`,
          { lineSetId: ls.id },
        );
      }
      ls.stage = 'in-position';
      ls.lockedAtMs = nowMs;
      return {
        ok: true,
        entries: [{ kind: 'locked', lineSetId: ls.id, details: { ...lineSetRef(ls), answeredBy: ls.call?.answers.map((a) => a.name) ?? [] } }],
      };
    },
  },

  'confirm-tie-off': {
    who: 'lead',
    atRail: true,
    apply({ state }) {
      const ls = needActive(state);
      if (isRefusal(ls)) return ls;
      if (!ls.needsTieOff) return refuse(`The plan for ${lineSetLabel(ls.name)} needs no tie-off.`, { lineSetId: ls.id });
      if (ls.tiedOff || pastStage(ls, 'in-position')) {
        return alreadyDone(`${capital(lineSetLabel(ls.name))} has already been tied off.`, { lineSetId: ls.id });
      }
      if (ls.stage !== 'in-position') return refuse(first(lineSetDuty(state, ls)), { lineSetId: ls.id });
      ls.tiedOff = true;
      markDone(ls, 'tie-off');
      return { ok: true, entries: [{ kind: 'tied-off', lineSetId: ls.id, details: lineSetRef(ls) }] };
    },
  },

  'call-clear-rail': {
    who: ['loader'],
    atRail: false,
    apply({ state }) {
      const ls = needActive(state);
      if (isRefusal(ls)) return ls;
      if (ls.stage !== 'in-position' || (ls.needsTieOff && !ls.tiedOff)) {
        return wrongStage(state, ls, pastStage(ls, 'in-position'), 'The rail has already been called clear.');
      }
      ls.stage = 'rail-clear-called';
      return { ok: true, entries: [{ kind: 'rail-clear-called', lineSetId: ls.id, details: lineSetRef(ls) }] };
    },
  },

  'confirm-rail-clear': {
    // Not `atRail`: confirming it is the step away from the rail (and a repeat is "already done").
    who: 'lead',
    atRail: false,
    apply({ state, nowMs }) {
      const ls = needActive(state);
      if (isRefusal(ls)) return ls;
      if (ls.stage !== 'rail-clear-called') {
        return wrongStage(state, ls, pastStage(ls, 'rail-clear-called'), 'The rail is already clear.');
      }
      ls.stage = 'rail-clear';
      ls.railClearAtMs = nowMs;
      return {
        ok: true,
        // At least 10 ft from the rail and out from under the gallery, keeping watch (TRADE.md, people and calls).
        entries: [{ kind: 'rail-clear-confirmed', lineSetId: ls.id, details: { ...lineSetRef(ls), distanceFt: 10 } }],
      };
    },
  },

  'confirm-step': {
    who: ['loader', 'deck'],
    atRail: false,
    apply({ state, action, me }) {
      const ls = needActive(state);
      if (isRefusal(ls)) return ls;
      const i = action.stepIndex;
      const at = { lineSetId: ls.id, stepIndex: i };
      const step = ls.steps[i];
      if (!step) return refuse(`${capital(lineSetLabel(ls.name))} has no step ${i + 1}.`, at);
      if (!isWorkStep(step)) {
        return refuse(`Step ${i + 1} (${stepText(ls, i)}) is the rail operator's, not a loading step.`, at);
      }
      if (ls.done[i]) return alreadyDone(`Step ${i + 1} is already done: ${stepText(ls, i, 'done')}.`, at);
      if (ls.stage !== 'rail-clear') return refuse(first(lineSetDuty(state, ls)), at);
      const role = stepRole(step);
      if (me.role !== role) {
        return forbid(`${capital(stepText(ls, i))} is confirmed by ${role === 'loader' ? 'a loader' : 'the deck crew'}.`);
      }
      const next = nextWorkStepIndex(ls);
      if (i !== next) return refuse(first(stepDuty(ls, next)), at);
      ls.load = applyStep(ls.load, step, ls.brickTypes);
      ls.imbalanceKg = loadImbalanceKg(ls.load, ls.brickTypes);
      ls.done[i] = true;
      return {
        ok: true,
        entries: [
          {
            kind: 'step-confirmed',
            lineSetId: ls.id,
            stepIndex: i,
            details: {
              ...lineSetRef(ls),
              step: structuredClone(step),
              text: stepText(ls, i, 'done'),
              imbalanceKg: ls.imbalanceKg,
              plannedImbalanceKg: step.imbalanceAfterKg,
              bricksOnArbor: { ...ls.load.bricks },
              piecesOnBatten: ls.load.pieces.map((p) => p.id),
            },
          },
        ],
      };
    },
  },

  'call-loading-complete': {
    who: ['loader'],
    atRail: false,
    apply({ state, nowMs }) {
      const ls = needActive(state);
      if (isRefusal(ls)) return ls;
      if (ls.stage !== 'rail-clear' || nextWorkStepIndex(ls) >= 0) {
        return wrongStage(state, ls, pastStage(ls, 'rail-clear'), `Loading complete has already been called on ${lineSetLabel(ls.name)}.`);
      }
      ls.stage = 'loading-complete';
      ls.loadingCompleteAtMs = nowMs;
      return {
        ok: true,
        entries: [{ kind: 'loading-complete', lineSetId: ls.id, details: { ...lineSetRef(ls), imbalanceKg: ls.imbalanceKg } }],
      };
    },
  },

  'confirm-untie': {
    who: 'lead',
    atRail: true,
    apply({ state }) {
      const ls = needActive(state);
      if (isRefusal(ls)) return ls;
      if (!ls.needsTieOff) return refuse(`${capital(lineSetLabel(ls.name))} was not tied off.`, { lineSetId: ls.id });
      if (ls.stage !== 'loading-complete' || !ls.tiedOff) {
        return wrongStage(state, ls, pastStage(ls, 'loading-complete') || (ls.stage === 'loading-complete' && !ls.tiedOff), `${capital(lineSetLabel(ls.name))} is already untied.`);
      }
      ls.tiedOff = false;
      markDone(ls, 'untie');
      return { ok: true, entries: [{ kind: 'untied', lineSetId: ls.id, details: lineSetRef(ls) }] };
    },
  },

  'record-test': {
    who: 'lead',
    atRail: true,
    apply({ state, action, me, nowMs }) {
      const active = needActive(state);
      if (isRefusal(active)) return active;
      const ls = action.lineSetId ? state.lineSets.find((l) => l.id === action.lineSetId) : active;
      if (!ls) return refuse('That line set is not in this session.');
      if (ls !== active) {
        // A re-test of an earlier set, after a correction: only between line sets.
        if (ls.stage !== 'tested') return refuse(first(lineSetDuty(state, ls)), { lineSetId: ls.id });
        if (active.stage !== 'tested') {
          return refuse(`${capital(lineSetLabel(active.name))} is being worked: ${lineSetDuty(state, active).replace(/^T/, 't')} first.`, { lineSetId: ls.id });
        }
      } else if (!(ls.stage === 'tested' || (ls.stage === 'loading-complete' && !ls.tiedOff))) {
        return refuse(first(lineSetDuty(state, ls)), { lineSetId: ls.id });
      }
      if (action.result !== 'balanced' && action.estimateKg === undefined) {
        return refuse('Give an estimate in kg for a set that is out of balance.', { lineSetId: ls.id });
      }
      const wasFlagged = ls.flagged;
      const estimateKg = action.result === 'balanced' ? null : (action.estimateKg ?? null);
      // Beyond what the rope lock holds, the set must be tied off before anyone moves on (TRADE.md).
      const beyondLock = estimateKg !== null && estimateKg > ls.ropeLockLimitKg;
      if (beyondLock && !action.tiedOff) {
        return refuse(
          `That is more out of balance than the rope lock holds (${formatMass(ls.ropeLockLimitKg, 'imperial')}, ${formatMass(ls.ropeLockLimitKg, 'metric')}): tie ${lineSetLabel(ls.name)} off at the rail first, keep it attended, and record the test as tied off.`,
          { lineSetId: ls.id },
        );
      }
      const wasTied = ls.tiedOff;
      ls.tiedOff = beyondLock || (ls.tiedOff && action.result !== 'balanced');
      ls.tests.push({ result: action.result, estimateKg, note: action.note ?? null, atMs: nowMs, byPersonId: me.personId });
      ls.flagged = action.result !== 'balanced';
      ls.stage = 'tested';
      markDone(ls, 'test-balance');
      const entries: LogDraft[] = [
        {
          kind: 'test-recorded',
          lineSetId: ls.id,
          details: {
            ...lineSetRef(ls),
            result: action.result,
            estimateKg,
            note: action.note ?? null,
            flagged: ls.flagged,
            flagCleared: wasFlagged && !ls.flagged,
            tiedOff: ls.tiedOff,
            untied: wasTied && !ls.tiedOff,
            computedImbalanceKg: ls.imbalanceKg,
          },
        },
      ];
      return { ok: true, entries: [...entries, ...finishIfComplete(state, nowMs)] };
    },
  },

  'call-hold': {
    who: 'joined',
    atRail: false,
    apply({ state, action, me, nowMs }) {
      // A second hold while one is on never reaches here: the hold check refuses it first.
      state.hold = {
        byPersonId: me.personId,
        byName: me.name,
        reason: action.reason ?? null,
        atMs: nowMs,
        acks: [{ personId: me.personId, name: me.name, atMs: nowMs }],
      };
      const ls = activeLineSet(state);
      return {
        ok: true,
        entries: [{ kind: 'hold-called', ...(ls ? { lineSetId: ls.id } : {}), details: { reason: state.hold.reason, ...(ls ? lineSetRef(ls) : {}) } }],
      };
    },
  },

  'ack-hold': {
    who: 'joined',
    atRail: false,
    apply({ state, me, nowMs }) {
      if (!state.hold) return refuse('No hold is on.');
      if (state.hold.acks.some((a) => a.personId === me.personId)) return alreadyDone('You have already acknowledged the hold.');
      state.hold.acks.push({ personId: me.personId, name: me.name, atMs: nowMs });
      return { ok: true, entries: [{ kind: 'hold-acknowledged', details: { holdBy: state.hold.byName } }] };
    },
  },

  'release-hold': {
    who: 'lead',
    atRail: false,
    apply({ state, nowMs }) {
      if (!state.hold) return alreadyDone('No hold is on.');
      const hold = state.hold;
      state.hold = null;
      state.lastHoldReleasedAtMs = nowMs;
      return {
        ok: true,
        entries: [
          {
            kind: 'hold-released',
            details: { holdBy: hold.byName, reason: hold.reason, heldForMs: nowMs - hold.atMs, acknowledgedBy: hold.acks.map((a) => a.name) },
          },
        ],
      };
    },
  },

  note: {
    who: 'joined',
    atRail: false,
    apply({ state, action }) {
      const ls = activeLineSet(state);
      return { ok: true, entries: [{ kind: 'note', ...(ls ? { lineSetId: ls.id } : {}), details: { text: action.text } }] };
    },
  },

  end: {
    who: 'lead',
    atRail: false,
    apply({ state, action, nowMs }) {
      // Not while loaders handle steel: the log would stop with a set half loaded. Hold first, finish, then end.
      const working = activeLineSet(state);
      if (working && (working.stage === 'rail-clear-called' || working.stage === 'rail-clear')) {
        return {
          ok: false,
          code: 'refused',
          reason: `The loaders are working on ${lineSetLabel(working.name)}: they call "loading complete" first (call a hold to stop them now).`,
          lineSetId: working.id,
        };
      }
      state.phase = 'finished';
      state.endedAtMs = nowMs;
      state.endedHow = 'ended';
      state.endReason = action.reason;
      return {
        ok: true,
        entries: [
          {
            kind: 'ended',
            details: {
              reason: action.reason,
              untested: state.lineSets.filter((l) => l.stage !== 'tested').map((l) => l.name),
              flagged: state.lineSets.filter((l) => l.flagged).map((l) => l.name),
            },
          },
        ],
      };
    },
  },

  're-alert': {
    who: 'system',
    atRail: false,
    apply({ state, action, nowMs }) {
      const ls = activeLineSet(state);
      if (!ls?.call || ls.stage !== 'move-called') return alreadyDone('No move call is waiting for answers.');
      const silent = notYetClear(state).filter((p) => action.personIds.includes(p.personId));
      if (!silent.length) return alreadyDone('Everyone named has answered "clear".', { lineSetId: ls.id });
      for (const p of silent) {
        const alert = ls.call.alerts.find((a) => a.personId === p.personId);
        if (alert) {
          alert.count += 1;
          alert.lastMs = nowMs;
        } else {
          ls.call.alerts.push({ personId: p.personId, count: 1, lastMs: nowMs });
        }
      }
      return {
        ok: true,
        entries: [
          {
            kind: 're-alerted',
            lineSetId: ls.id,
            details: { ...lineSetRef(ls), people: silent.map((p) => ({ personId: p.personId, name: p.name })), silentSinceMs: ls.call.calledAtMs },
          },
        ],
      };
    },
  },
};

/** Actions accepted while a hold is on. */
const DURING_HOLD = new Set<AnyAction['type']>(['ack-hold', 'release-hold']);

/** The checks every action shares (see the top of this file), before its own rule. */
function sharedChecks(state: SessionState, action: AnyAction, actor: Actor, me: Participant | undefined): Refusal | null {
  const rule = RULES[action.type];
  const isSystem = actor.personId === SYSTEM_ACTOR.personId;
  if (rule.who === 'system' && !isSystem) return forbid('Only Railcall itself sends that.');
  if (rule.who !== 'system' && isSystem) return forbid('Railcall does not act for people.');
  if (state.phase === 'finished') return refuse('The session has finished.');
  if (state.hold && !DURING_HOLD.has(action.type)) {
    // With no lead, nobody could release the hold: let a rail operator join to do it.
    const railJoinWithoutLead = action.type === 'join' && action.role === 'rail' && state.leadPersonId === null;
    if (!railJoinWithoutLead) return refuse(holdText(state.hold));
  }
  if (rule.who === 'anyone' || rule.who === 'system') return null;
  if (!me) return forbid('Join the session first.');
  if (rule.who === 'lead' && state.leadPersonId !== me.personId) {
    const lead = state.participants.find((p) => p.personId === state.leadPersonId);
    return forbid(`Only the rail operator who leads the session${lead ? ` (${lead.name})` : ''} does that.`);
  }
  const roles: readonly SessionRole[] | null = typeof rule.who === 'string' ? null : rule.who;
  if (roles && !roles.includes(me.role)) {
    const forWhom = nameList(roles.map((r) => ROLE_LABELS[r].toLowerCase())).replace(/ and /, ' or ');
    return forbid(`That is for ${forWhom}, not ${ROLE_LABELS[me.role].toLowerCase()}.`);
  }
  if (rule.who !== 'joined' && !actor.venueRoles.includes(me.role)) {
    return forbid(`You no longer hold the ${ROLE_LABELS[me.role].toLowerCase()} role at this venue.`);
  }
  const ls = activeLineSet(state);
  if (rule.atRail && ls?.stage === 'rail-clear') {
    return refuse(
      `The rail is clear for loading on ${lineSetLabel(ls.name)}: nothing may be done at the rail until the loaders call "loading complete".`,
      { lineSetId: ls.id },
    );
  }
  return null;
}

/**
 * Decide one action. Pure: the input state is never changed; an accepted action returns a new
 * state and the log entries to append; a refusal returns the reason (what must happen first) and
 * an entry for the log too. `nowMs` is the server's clock, used for every time in the state.
 */
export function decide(state: SessionState, action: AnyAction, actor: Actor, nowMs: number): Decision {
  const me = participantOf(state, actor.personId);
  const role = actor.personId === SYSTEM_ACTOR.personId ? 'system' : (me?.role ?? null);
  const refused = (r: Refusal): Decision => ({
    ok: false,
    code: r.code,
    reason: r.reason,
    entry: {
      kind: 'refused',
      ...(r.lineSetId ? { lineSetId: r.lineSetId } : {}),
      ...(r.stepIndex !== undefined ? { stepIndex: r.stepIndex } : {}),
      role,
      details: { action: structuredClone(action), code: r.code, reason: r.reason },
    },
  });
  const shared = sharedChecks(state, action, actor, me);
  if (shared) return refused(shared);

  const draft = structuredClone(state);
  const ctx = { state: draft, action, actor, me: participantOf(draft, actor.personId)!, nowMs } as Ctx<never>;
  const outcome = (RULES[action.type] as Rule<AnyAction>).apply(ctx as Ctx<AnyAction>);
  if (!outcome.ok) return refused(outcome);
  return {
    ok: true,
    state: draft,
    entries: outcome.entries.map((e) => ({ ...e, role: e.role === undefined ? role : e.role })),
  };
}
