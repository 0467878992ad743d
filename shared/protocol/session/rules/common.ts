/**
 * What every rule shares: the shape of a decision and of a rule, the refusal helpers and the small
 * lookups the stages use. The rules live one file per stage beside this one; machine.ts joins them.
 */
import type { SessionRole } from '../../roles';
import type { SessionAction, SystemAction } from '../schema';
import { activeLineSet, type Actor, type LineSetState, type Participant, type SessionState } from '../state';
import { lineSetDuty, sessionDuty } from '../words';

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

export interface Refusal {
  ok: false;
  code: RefusalCode;
  reason: string;
  lineSetId?: string;
  stepIndex?: number;
}
export type Outcome = { ok: true; entries: LogDraft[] } | Refusal;

export const refuse = (reason: string, extra: Partial<Refusal> = {}): Refusal => ({ ok: false, code: 'refused', reason, ...extra });
export const forbid = (reason: string): Refusal => ({ ok: false, code: 'forbidden', reason });
export const alreadyDone = (reason: string, extra: Partial<Refusal> = {}): Refusal => ({ ok: false, code: 'already-done', reason, ...extra });
export const first = (duty: string) => `${duty} first.`;

/** Everything a rule sees. `state` is the decision's own copy: rules change it freely. */
export interface Ctx<A extends AnyAction> {
  state: SessionState;
  action: A;
  actor: Actor;
  /** The actor as a participant; set for every rule except join and system actions. */
  me: Participant;
  nowMs: number;
}

/** Who may send an action: anyone (join), the lead, Railcall itself, any joined person, or these roles. */
export type Who = 'anyone' | 'lead' | 'system' | 'joined' | readonly SessionRole[];

export interface Rule<A extends AnyAction> {
  who: Who;
  /** Done at the rail: refused from "rail is clear" until "loading complete". */
  atRail: boolean;
  apply(ctx: Ctx<A>): Outcome;
}

export type RuleTable = { [T in AnyAction['type']]: Rule<Extract<AnyAction, { type: T }>> };
/** The rules for some of the actions: one stage's file. */
export type RulesFor<K extends AnyAction['type']> = Pick<RuleTable, K>;

export const lineSetRef = (ls: LineSetState) => ({ lineSetId: ls.id, lineSetName: ls.name });

/** The active line set, or a refusal saying what must happen before there is one. */
export function needActive(state: SessionState): LineSetState | Refusal {
  if (state.phase === 'gathering') return refuse(first(sessionDuty(state)));
  const ls = activeLineSet(state);
  return ls ?? refuse(first(sessionDuty(state)));
}
export const isRefusal = (x: unknown): x is Refusal => typeof x === 'object' && x !== null && (x as Refusal).ok === false;

/** Refusal for an action that belongs to a stage: already past it, or not there yet. */
export function wrongStage(state: SessionState, ls: LineSetState, past: boolean, doneText: string): Refusal {
  return past ? alreadyDone(doneText, { lineSetId: ls.id }) : refuse(first(lineSetDuty(state, ls)), { lineSetId: ls.id });
}

export const STAGE_ORDER = ['waiting', 'move-called', 'in-position', 'rail-clear-called', 'rail-clear', 'loading-complete', 'tested'] as const;
export const pastStage = (ls: LineSetState, stage: (typeof STAGE_ORDER)[number]) => STAGE_ORDER.indexOf(ls.stage) > STAGE_ORDER.indexOf(stage);

export function markDone(ls: LineSetState, kind: 'tie-off' | 'untie' | 'test-balance') {
  ls.steps.forEach((s, i) => {
    if (s.kind === kind) ls.done[i] = true;
  });
}

/** The session finishes on its own when every line set has a test result and none is out of balance. */
export function finishIfComplete(state: SessionState, nowMs: number): LogDraft[] {
  if (!state.lineSets.every((l) => l.stage === 'tested' && !l.flagged)) return [];
  state.phase = 'finished';
  state.endedAtMs = nowMs;
  state.endedHow = 'complete';
  return [{ kind: 'finished', role: 'system', details: { lineSets: state.lineSets.length } }];
}

