/** A two-drape unload session for the client component tests, driven through the shared rules. */
import { h, type Component } from 'vue';
import { mount } from '@vue/test-utils';
import { Quasar } from 'quasar';
import {
  createSessionState,
  decide,
  type Actor,
  type AnyAction,
  type SessionState,
} from '@shared/protocol/session';
import type { BrickType, LineSetLoad, PlanStep } from '@shared/rigging';

/** 1 lb = 0.45359237 kg exactly (1959 international yard and pound agreement). */
export const LB = 0.45359237;
/** The rope lock limit: a venue setting, 50 lb by default (common practice). */
export const ROPE_LOCK_KG = 50 * LB;

export const brickTypes: BrickType[] = [{ type: 'full', massKg: 20 * LB }];

/** Balanced: 60 lb pipe + two 40 lb drapes = 140 lb; 60 lb arbor + four 20 lb bricks = 140 lb. */
export const twoDrapeLoad: LineSetLoad = {
  purchase: 1,
  pipeKg: 60 * LB,
  arborKg: 60 * LB,
  pieces: [
    { id: 'a', massKg: 40 * LB },
    { id: 'b', massKg: 40 * LB },
  ],
  bricks: { full: 4 },
};

export const twoDrapeSteps: PlanStep[] = [
  { kind: 'remove-bricks', pieceId: 'a', bricks: { full: 2 }, imbalanceAfterKg: 40 * LB },
  { kind: 'remove-piece', pieceId: 'a', imbalanceAfterKg: 0 },
  { kind: 'remove-bricks', pieceId: 'b', bricks: { full: 2 }, imbalanceAfterKg: 40 * LB },
  { kind: 'remove-piece', pieceId: 'b', imbalanceAfterKg: 0 },
  { kind: 'test-balance', imbalanceAfterKg: 0 },
];

export const jo: Actor = { personId: 1, name: 'Jo Castellan', venueRoles: ['rail'] };
export const sam: Actor = { personId: 2, name: 'Sam Brightwater', venueRoles: ['loader'] };
export const alex: Actor = { personId: 3, name: 'Alex Tamsin', venueRoles: ['loader'] };
export const robin: Actor = { personId: 4, name: 'Robin Ashby', venueRoles: ['deck'] };
export const kit: Actor = { personId: 5, name: 'Kit Harrow', venueRoles: ['stage-manager'] };

export function newSession(): SessionState {
  return createSessionState({
    lineSets: [
      {
        id: 'ls7',
        name: '7',
        steps: twoDrapeSteps,
        load: twoDrapeLoad,
        brickTypes,
        ropeLockLimitKg: ROPE_LOCK_KG,
        pieceNames: { a: 'Sea-mist drape A', b: 'Sea-mist drape B' },
      },
    ],
  });
}

/** Applies actions in order; throws on a refusal so a fixture never silently stalls. */
export function play(state: SessionState, ...moves: Array<[Actor, AnyAction]>): SessionState {
  let now = 1_000;
  for (const [actor, action] of moves) {
    const decision = decide(state, action, actor, (now += 1000));
    if (!decision.ok) throw new Error(`${actor.name} ${action.type}: ${decision.reason}`);
    state = decision.state;
  }
  return state;
}

/** Everyone joined and loading begun. */
export function begun(): SessionState {
  return play(
    newSession(),
    [jo, { type: 'join', role: 'rail' }],
    [sam, { type: 'join', role: 'loader' }],
    [alex, { type: 'join', role: 'loader' }],
    [robin, { type: 'join', role: 'deck' }],
    [kit, { type: 'join', role: 'stage-manager' }],
    [jo, { type: 'begin' }],
  );
}

/** The move called; the loaders answered, the deck still silent. */
export function calledDeckSilent(): SessionState {
  return play(begun(), [jo, { type: 'call-move' }], [sam, { type: 'answer-clear' }], [alex, { type: 'answer-clear' }]);
}

/** Rail clear: the loaders' first brick step is next. */
export function railClear(): SessionState {
  return play(
    calledDeckSilent(),
    [robin, { type: 'answer-clear' }],
    [jo, { type: 'confirm-locked' }],
    [sam, { type: 'call-clear-rail' }],
    [jo, { type: 'confirm-rail-clear' }],
  );
}

export function mountWithQuasar(component: Component, props: Record<string, unknown>) {
  return mount({ render: () => h(component, props) }, { attachTo: document.body, global: { plugins: [Quasar] } });
}
