import { randomUUID } from 'node:crypto';
import type { DataSource } from 'typeorm';
import type { SessionAction } from '@shared/protocol/session';
import { PeopleService, type SignedInUser } from '../../features/people/people.service';
import { Person } from '../../features/people/person.entity';
import { ScheduleService } from '../../features/schedule/schedule.service';
import { SessionsService } from '../../features/sessions/sessions.service';

export interface PastSessionOptions {
  /** When the session opens (ms since 1970); each later action is `stepMs` after the one before. */
  startMs: number;
  stepMs?: number;
  /** Extra notes from the stage manager while the rail is clear, to make a long log. */
  notes?: number;
}

/**
 * Plays the demo drape unload of line set 7 through the real session service, on a clock of its own:
 * a finished session at a chosen time, hash-chained and written back to the schedule exactly as a live
 * one. For an end-to-end lane that needs yesterday's session, and for the report benchmark.
 */
export async function playPastDrapeUnload(db: DataSource, opts: PastSessionOptions): Promise<number> {
  const clock = { ms: opts.startMs };
  const schedule = new ScheduleService(db);
  const people = new PeopleService(db);
  const sessions = new SessionsService(db, schedule, people, () => clock.ms);
  try {
    return await play(db, opts, { clock, schedule, people, sessions });
  } finally {
    await sessions.close();
  }
}

interface Players { clock: { ms: number }; schedule: ScheduleService; people: PeopleService; sessions: SessionsService }

async function play(db: DataSource, opts: PastSessionOptions, { clock, schedule, people, sessions }: Players): Promise<number> {
  const step = opts.stepMs ?? 9000;
  const user = async (email: string): Promise<SignedInUser> => {
    const person = await db.getRepository(Person).findOneByOrFail({ email });
    const u = await people.loadUser(person.id);
    if (!u) throw new Error(`${email} holds no role`);
    return u;
  };
  const [rail, loader1, loader2, deck, sm] = await Promise.all(
    ['rail', 'loader1', 'loader2', 'deck', 'sm'].map((who) => user(`${who}@larkspur.example`)),
  );
  const ls7 = (await schedule.lineSets(rail.venueId)).find((l) => l.number === 7);
  if (!ls7) throw new Error('The demo venue has no line set 7');
  const { session } = await sessions.create(rail, {
    title: 'Strike the sea-mist drapes',
    lineSets: [{ lineSetId: ls7.id, remove: ls7.pieces.map((p) => p.id), add: [] }],
  });
  const act = async (who: SignedInUser, action: SessionAction) => {
    clock.ms += step;
    const { answer } = await sessions.act(who, session.id, { key: randomUUID(), clientTimeMs: clock.ms - 300, action });
    if (!answer.ok) throw new Error(`${who.name}: ${action.type} refused: ${answer.error.message}`);
  };
  // The rail operator who opened it leads it already.
  await act(loader1, { type: 'join', role: 'loader' });
  await act(loader2, { type: 'join', role: 'loader' });
  await act(deck, { type: 'join', role: 'deck' });
  await act(sm, { type: 'join', role: 'stage-manager' });
  await act(rail, { type: 'begin' });
  await act(rail, { type: 'call-move' });
  for (const p of [deck, loader1, loader2]) await act(p, { type: 'answer-clear' });
  await act(rail, { type: 'confirm-locked' });
  await act(loader1, { type: 'call-clear-rail' });
  await act(rail, { type: 'confirm-rail-clear' });
  await act(loader1, { type: 'confirm-step', stepIndex: 0 });
  await act(deck, { type: 'confirm-step', stepIndex: 1 });
  await act(sm, { type: 'call-hold', reason: 'Heads: a clamp left on the deck' });
  await act(rail, { type: 'release-hold' });
  for (let i = 0; i < (opts.notes ?? 0); i += 1) await act(sm, { type: 'note', text: `Watching the strike, note ${i + 1}` });
  await act(loader2, { type: 'confirm-step', stepIndex: 2 });
  await act(deck, { type: 'confirm-step', stepIndex: 3 });
  await act(loader1, { type: 'call-loading-complete' });
  await act(rail, { type: 'record-test', result: 'balanced', note: 'Runs true both ways' });
  return session.id;
}
