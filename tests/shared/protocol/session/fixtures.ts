/** Plans, people and a small driver shared by the session tests. */
import { expect } from 'vitest';
import type { BrickType, LineSetLoad, PlanStep } from '@shared/rigging';
import {
  createSessionState,
  decide,
  type Actor,
  type AnyAction,
  type Decision,
  type LineSetInput,
  type SessionState,
} from '@shared/protocol/session';

/** 1 lb = 0.45359237 kg exactly (international yard and pound agreement, 1959). */
export const LB_KG = 0.45359237;
/** Rope lock limit: a venue setting, 50 lb by default (common practice). */
export const ROPE_LOCK_LIMIT_KG = 50 * LB_KG;

export const brickTypes: BrickType[] = [{ type: 'full', massKg: 9 }];

/**
 * A balanced single-purchase line set with two 18 kg drapes and four 9 kg bricks: 66 kg each side.
 * Unloading pulls the bricks for a piece first, then takes the piece off (common practice: counterweight is
 * the first thing unloaded), so the set only ever goes pipe-heavy, by 18 kg, inside the rope lock limit.
 */
export const twoDrapeLoad: LineSetLoad = {
  purchase: 1,
  pipeKg: 30,
  arborKg: 30,
  pieces: [
    { id: 'drape-a', massKg: 18 },
    { id: 'drape-b', massKg: 18 },
  ],
  bricks: { full: 4 },
};

/** Hand-written: remove-bricks(2 × 9 kg), remove drape A, remove-bricks(2), remove drape B, test. */
export const twoDrapeSteps: PlanStep[] = [
  { kind: 'remove-bricks', bricks: { full: 2 }, imbalanceAfterKg: 18 },
  { kind: 'remove-piece', pieceId: 'drape-a', imbalanceAfterKg: 0 },
  { kind: 'remove-bricks', bricks: { full: 2 }, imbalanceAfterKg: 18 },
  { kind: 'remove-piece', pieceId: 'drape-b', imbalanceAfterKg: 0 },
  { kind: 'test-balance', imbalanceAfterKg: 0 },
];

export const twoDrapeLineSet: LineSetInput = {
  id: 'ls-7',
  name: '7',
  steps: twoDrapeSteps,
  load: twoDrapeLoad,
  brickTypes,
  ropeLockLimitKg: ROPE_LOCK_LIMIT_KG,
  pieceNames: { 'drape-a': 'Drape A', 'drape-b': 'Drape B' },
};

/**
 * A 36 kg truss balanced by four bricks: pulling them leaves 36 kg pipe-heavy, beyond a 50 lb
 * (22.7 kg) rope lock, so the plan ties off first (common practice: beyond the limit the set is tied off).
 */
export const trussLineSet: LineSetInput = {
  id: 'ls-12',
  name: '12',
  steps: [
    { kind: 'tie-off', imbalanceAfterKg: 0 },
    { kind: 'remove-bricks', bricks: { full: 4 }, imbalanceAfterKg: 36 },
    { kind: 'remove-piece', pieceId: 'truss', imbalanceAfterKg: 0 },
    { kind: 'untie', imbalanceAfterKg: 0 },
    { kind: 'test-balance', imbalanceAfterKg: 0 },
  ],
  load: { purchase: 1, pipeKg: 30, arborKg: 30, pieces: [{ id: 'truss', massKg: 36 }], bricks: { full: 4 } },
  brickTypes,
  ropeLockLimitKg: ROPE_LOCK_LIMIT_KG,
  pieceNames: { truss: 'the LX truss' },
};

export const jo: Actor = { personId: 1, name: 'Jo Castellan', venueRoles: ['rail'] };
export const sam: Actor = { personId: 2, name: 'Sam Brightwater', venueRoles: ['loader'] };
export const alex: Actor = { personId: 3, name: 'Alex Tamsin', venueRoles: ['loader'] };
export const robin: Actor = { personId: 4, name: 'Robin Ashby', venueRoles: ['deck'] };
export const kit: Actor = { personId: 5, name: 'Kit Harrow', venueRoles: ['stage-manager'] };
export const lee: Actor = { personId: 6, name: 'Lee Marsh', venueRoles: ['rail', 'loader'] };

export const T0 = 1_700_000_000_000;

/** A state plus a clock, so tests read as the calls in order. */
export class Session {
  state: SessionState;
  nowMs = T0;
  last: Decision | null = null;

  constructor(lineSets: LineSetInput[] = [twoDrapeLineSet], settings?: Parameters<typeof createSessionState>[0]['settings']) {
    this.state = createSessionState({ lineSets, settings });
  }

  /** Decide and keep the new state when accepted. */
  try(actor: Actor, action: AnyAction, advanceMs = 1000): Decision {
    this.nowMs += advanceMs;
    const before = JSON.stringify(this.state);
    const d = decide(this.state, action, actor, this.nowMs);
    expect(JSON.stringify(this.state)).toBe(before);
    if (d.ok) this.state = d.state;
    this.last = d;
    return d;
  }

  /** Decide and insist it is accepted. */
  do(actor: Actor, action: AnyAction, advanceMs = 1000): Extract<Decision, { ok: true }> {
    const d = this.try(actor, action, advanceMs);
    if (!d.ok) throw new Error(`${actor.name} ${action.type} refused: ${d.reason}`);
    return d;
  }

  /** Decide and insist it is refused; returns the refusal. */
  refused(actor: Actor, action: AnyAction): Extract<Decision, { ok: false }> {
    const d = this.try(actor, action);
    if (d.ok) throw new Error(`${actor.name} ${action.type} was accepted`);
    return d;
  }

  /** The usual crew joined: Jo (rail, lead), Sam and Alex (loaders), Robin (deck), Kit (stage manager). */
  joinCrew(): this {
    this.do(jo, { type: 'join', role: 'rail' });
    this.do(sam, { type: 'join', role: 'loader' });
    this.do(alex, { type: 'join', role: 'loader' });
    this.do(robin, { type: 'join', role: 'deck' });
    this.do(kit, { type: 'join', role: 'stage-manager' });
    return this;
  }

  /** Crew joined, loading begun, the first line set called, answered, locked (and tied off if planned). */
  toInPosition(): this {
    this.joinCrew();
    this.do(jo, { type: 'begin' });
    this.do(jo, { type: 'call-move' });
    for (const p of [sam, alex, robin]) this.do(p, { type: 'answer-clear' });
    this.do(jo, { type: 'confirm-locked' });
    return this;
  }

  /** …and the rail cleared for loading. */
  toRailClear(): this {
    this.toInPosition();
    if (this.state.lineSets[this.state.activeIndex!].needsTieOff) this.do(jo, { type: 'confirm-tie-off' });
    this.do(sam, { type: 'call-clear-rail' });
    this.do(jo, { type: 'confirm-rail-clear' });
    return this;
  }
}
