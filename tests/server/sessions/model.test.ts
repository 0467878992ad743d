import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { randomUUID } from 'node:crypto';
import { allowedActions, ARBOR_HEAVY_TOLERANCE_KG, isWorkStep, type SessionAction, type SessionState } from '@shared/protocol/session';
import type { SessionRole } from '@shared/protocol/roles';
import { startTestApp, type TestApp } from '../../support/app';
import { PeopleService, type SignedInUser } from '../../../server/features/people/people.service';
import { verifyChain } from '../../../server/features/sessions/hash-chain';
import type { LogEntry } from '@shared/protocol/session';

const CREW: Array<{ email: string; role: SessionRole }> = [
  { email: 'rail@larkspur.example', role: 'rail' },
  { email: 'loader1@larkspur.example', role: 'loader' },
  { email: 'loader2@larkspur.example', role: 'loader' },
  { email: 'deck@larkspur.example', role: 'deck' },
  { email: 'sm@larkspur.example', role: 'stage-manager' },
];

/** An action of the given type, filled in from the draw (some fields deliberately off). */
function actionOf(type: SessionAction['type'], role: SessionRole, n: number, state: SessionState): SessionAction {
  switch (type) {
    case 'join': return { type, role: n % 7 === 0 ? 'rail' : role };
    case 'begin': return n % 2 ? { type } : { type, shortCrewReason: 'Second loader delayed' };
    case 'confirm-step': {
      const ls = state.activeIndex === null ? state.lineSets[0] : state.lineSets[state.activeIndex];
      const next = ls.steps.findIndex((s, i) => isWorkStep(s) && !ls.done[i]);
      return { type, stepIndex: n % 3 === 0 ? n % ls.steps.length : Math.max(0, next) };
    }
    case 'record-test': return n % 4 === 0 ? { type, result: 'arbor-heavy', estimateKg: 1 + (n % 5) } : { type, result: 'balanced' };
    case 'call-hold': return { type, reason: 'Someone under the gallery' };
    case 'give-hold-reason': return { type, reason: n % 2 ? 'Someone under the gallery' : 'Lost sight of the batten' };
    case 'record-clear-for': {
      const ls = state.activeIndex === null ? null : state.lineSets[state.activeIndex];
      const silent = ls?.call?.alerts.find((a) => !ls.call!.answers.some((x) => x.personId === a.personId));
      return { type, personId: silent?.personId ?? state.participants[n % Math.max(1, state.participants.length)]?.personId ?? 1, via: 'voice' };
    }
    case 'note': return { type, text: `Note ${n}` };
    case 'end': return { type, reason: 'Called off for the evening' };
    default: return { type } as SessionAction;
  }
}

/** Offered at almost any moment: left to the unguided draws so runs move the line set along. */
const UNGUIDED = new Set<SessionAction['type']>(['end', 'leave', 'note', 'call-hold']);

const ALL_TYPES: SessionAction['type'][] = [
  'join', 'leave', 'begin', 'call-move', 'answer-clear', 'confirm-locked', 'confirm-tie-off', 'call-clear-rail',
  'confirm-rail-clear', 'confirm-step', 'call-loading-complete', 'confirm-untie', 'record-test', 'call-hold',
  'ack-hold', 'release-hold', 'note',
];

/** Checks what the kept log says happened against the order the trade requires. */
function checkOrder(entries: LogEntry[], state: SessionState): void {
  const ls = state.lineSets[0];
  const workSteps = ls.steps.map((step, i) => (isWorkStep(step) ? i : -1)).filter((i) => i >= 0);
  const accepted = entries.filter((e) => e.kind !== 'refused');
  const seen = new Set<string>();
  const confirmed: number[] = [];
  // A correction after a test adds steps to the plan: each round is checked against the steps it had.
  const corrections = accepted.filter((e) => e.kind === 'correction-planned').map((e) => e.details as { fromStep: number; steps: unknown[] });
  let stepsInPlay = corrections[0]?.fromStep ?? ls.steps.length;
  let held = false;
  for (const e of accepted) {
    if (held) expect(['hold-acknowledged', 'hold-reason-given', 'hold-released', 'joined', 'left'], `${e.kind} during a hold`).toContain(e.kind);
    if (e.kind === 'hold-called') held = true;
    if (e.kind === 'hold-released') held = false;
    if (e.kind === 'locked') expect(seen.has('move-called'), 'locked before the move was called').toBe(true);
    if (e.kind === 'rail-clear-confirmed') expect(seen.has('locked') && seen.has('rail-clear-called')).toBe(true);
    if (e.kind === 'step-confirmed') {
      expect(seen.has('rail-clear-confirmed'), 'a step before the rail was clear').toBe(true);
      confirmed.push(e.stepIndex!);
    }
    if (e.kind === 'loading-complete') expect(confirmed).toEqual(workSteps.filter((i) => i < stepsInPlay));
    if (e.kind === 'correction-planned') {
      const { fromStep, steps } = e.details as { fromStep: number; steps: unknown[] };
      stepsInPlay = fromStep + steps.length;
      // The loaders clear the rail again and call loading complete again for the correction's bricks.
      for (const kind of ['rail-clear-called', 'rail-clear-confirmed', 'loading-complete']) seen.delete(kind);
    }
    if (e.kind === 'test-recorded') expect(seen.has('loading-complete')).toBe(true);
    seen.add(e.kind);
  }
  // Bricks for a piece before the piece, in plan order: the confirmed steps are a prefix of the plan's.
  expect(confirmed).toEqual(workSteps.slice(0, confirmed.length));
}

const reached = { steps: 0, tested: 0 };

describe('random actions from random crew members (model-based, real database)', () => {
  let t: TestApp;
  let crew: SignedInUser[];
  let lineSetId: number;

  beforeAll(async () => {
    t = await startTestApp();
    const people = new PeopleService(t.db);
    crew = await Promise.all(CREW.map(async (c) => (await people.loadUser((await people.findByEmail(c.email))!.id))!));
    const [row] = await t.database.owner.query('SELECT id FROM line_set WHERE number = 7');
    lineSetId = row.id;
  });
  afterAll(async () => { await t.close(); });

  it('never records a broken order or an arbor-heavy set, and the log stays gapless with a valid chain', async () => {
    const draw = fc.array(fc.record({ who: fc.nat(CREW.length - 1), guided: fc.nat(9), pick: fc.nat(1000) }), { minLength: 20, maxLength: 80 });
    await fc.assert(fc.asyncProperty(draw, async (moves) => {
      // Each run opens a fresh session on line set 7 (the previous one is closed off by the owner account).
      await t.database.owner.query("UPDATE loading_session SET phase = 'finished'");
      const [piece] = await t.database.owner.query('SELECT id FROM piece WHERE line_set_id = ? ORDER BY id', [lineSetId]);
      const { session } = await t.railcall.sessions.create(crew[0], {
        title: 'Model run', lineSets: [{ lineSetId, remove: piece ? [piece.id] : [], add: piece ? [] : [{ name: 'Spare drape', massKg: 18, positionM: null }] }],
      });
      let state = (await t.railcall.sessions.get(crew[0], session.id)).state;
      for (const move of moves) {
        // Mostly what some phone would offer now; sometimes anything at all, from anyone.
        const offered = crew.flatMap((person, i) => allowedActions(state, person.id)
          .filter((a) => !UNGUIDED.has(a)).map((type) => ({ i, type })));
        const pick = move.guided < 8 && offered.length ? offered[move.pick % offered.length] : { i: move.who, type: ALL_TYPES[move.pick % ALL_TYPES.length] };
        const who = crew[pick.i];
        const role = CREW[pick.i].role;
        const type = pick.type;
        const outcome = await t.railcall.sessions.act(who, session.id, { key: randomUUID(), clientTimeMs: Date.now(), action: actionOf(type, role, move.pick, state) });
        state = outcome.state;
        for (const ls of state.lineSets) expect(ls.imbalanceKg).toBeGreaterThanOrEqual(-ARBOR_HEAVY_TOLERANCE_KG);
      }
      const record = await t.railcall.sessions.record(crew[4], session.id);
      const { entries } = record;
      expect(verifyChain(entries, record.genesisHash, record)).toEqual({ ok: true });
      if (process.env.DEBUG_MODEL) console.log(entries.map((e) => e.kind + (e.kind === 'refused' ? ':' + String(e.details.reason).slice(0, 60) : '')).join('\n'));
      checkOrder(entries, state);
      if (entries.some((e) => e.kind === 'step-confirmed')) reached.steps++;
      if (entries.some((e) => e.kind === 'test-recorded')) reached.tested++;
    }), { numRuns: 40, endOnFailure: true });
    // The guided draws must get deep enough to test the later rules, not only the first refusals.
    expect(reached.steps).toBeGreaterThan(0);
    expect(reached.tested).toBeGreaterThan(0);
  }, 120_000);
});
