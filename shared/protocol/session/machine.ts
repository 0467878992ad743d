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
 *   2. a hold is on → refused unless it is acknowledging, explaining or releasing it, or the lead ending the session;
 *   3. the person has not joined → forbidden (except `join`);
 *   4. the person's role does not fit (`who`) or the venue no longer gives them that role → forbidden;
 *   5. a rail-side action while the rail is clear → refused;
 *   6. the rule's own order checks → refused (or already-done for something that already happened).
 *
 * The rules live one file per stage in `rules/` (gathering, move, loading, testing, anytime); this
 * file joins them into one table and holds the shared checks.
 *
 * One lead: the first person to join in the rail role leads the session. Only the lead acts at the
 * rail, begins, releases holds and ends; any further rail operators watch, note and call holds like
 * stage managers. Before loading begins, a leaving lead hands the lead to the next rail operator who
 * joined; once loading has begun the lead cannot leave (end the session with a reason instead).
 */
import { ROLE_LABELS, type SessionRole } from '../roles';
import { ANYTIME_RULES } from './rules/anytime';
import { forbid, refuse, type AnyAction, type Ctx, type Decision, type Refusal, type Rule, type RuleTable } from './rules/common';
import { GATHERING_RULES } from './rules/gathering';
import { LOADING_RULES } from './rules/loading';
import { MOVE_RULES } from './rules/move';
import { TESTING_RULES } from './rules/testing';
import { SYSTEM_ACTOR, activeLineSet, participantOf, type Actor, type Participant, type SessionState } from './state';
import { holdText, lineSetLabel, nameList } from './words';

export type { AnyAction, Decision, LogDraft, RefusalCode } from './rules/common';

/** Every action's rule, from the stage files. */
export const RULES: RuleTable = { ...GATHERING_RULES, ...MOVE_RULES, ...LOADING_RULES, ...TESTING_RULES, ...ANYTIME_RULES };

/** Actions accepted while a hold is on. */
const DURING_HOLD = new Set<AnyAction['type']>(['ack-hold', 'give-hold-reason', 'release-hold', 'end']);

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
