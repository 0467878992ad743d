import { createHash } from 'node:crypto';
import type { DataSource, EntityManager } from 'typeorm';
import {
  actionEnvelopeSchema, canonicalJson, createSessionState, decide, nextReAlertAtMs, refusalToApiError, SessionPlanError, silentSince, SYSTEM_ACTOR,
  type ActionEnvelope, type Actor, type AnyAction, type LogEntry, type SessionState,
} from '@shared/protocol/session';
import { EVENTS_PAGE_LIMIT, NOT_RAIL_LEAD_TEXT, lineSetKey, planSession, type EventsPage, sessionPlanErrors, type CreateSessionInput, type SessionSummary } from '@shared/protocol/sessions-api';
import type { ApiError } from '@shared/protocol/ack';
import { signInNowOf, signInStatement, SignInEnded, SignInMoved } from '../auth/sign-in-row';
import { HttpError, notFound } from '../../middleware/http-error';
import { parseInput } from '../../middleware/validate';
import type { PeopleService, SignedInUser } from '../people/people.service';
import { Person } from '../people/person.entity';
import type { ScheduleService } from '../schedule/schedule.service';
import { LineSetRow } from '../schedule/line-set.entity';
import { BrickTypeRow } from '../schedule/brick-type.entity';
import { ActionKeyRow, LoadingSessionRow, SessionEventRow, type StoredAnswer } from './session.entity';
import { appendEntries, chainEntries, toLogEntry } from './session-log';
import { SessionLocks } from './hot-path';
import { PERSON_WITH_ROLES_SQL, signedInUserOf, type PersonRoleSqlRow } from '../people/signed-in-user';
import { genesisHash } from './hash-chain';
import { writeBackSchedule } from './schedule-writeback';

/** What an action comes to: the answer for the phone, and what to broadcast (nothing on a repeat). */
export interface ActOutcome {
  answer: { ok: true; seq: number; state: SessionState } | { ok: false; seq: number; error: ApiError };
  entries: LogEntry[];
  state: SessionState;
}

/** Told after every commit that wrote entries: broadcasting never happens inside a transaction. */
export type CommittedListener = (c: { sessionId: number; venueId: number; entries: LogEntry[]; state: SessionState }) => void;

export class SessionsService {
  private readonly listeners: CommittedListener[] = [];
  private readonly locks: SessionLocks;

  constructor(
    private readonly db: DataSource,
    private readonly schedule: ScheduleService,
    private readonly people: PeopleService,
    private readonly now: () => number = Date.now,
  ) {
    this.locks = new SessionLocks(db);
  }

  /** Closes the pool the decisions run on (the app's own pool is closed by its owner). */
  close(): Promise<void> {
    return this.locks.close();
  }

  onCommitted(listener: CommittedListener): void {
    this.listeners.push(listener);
  }

  private committed(sessionId: number, venueId: number, entries: LogEntry[], state: SessionState): void {
    if (entries.length === 0) return;
    for (const listener of this.listeners) listener({ sessionId, venueId, entries, state });
  }

  /** Plans the change from the schedule (the same planner the phone previews with) and opens a session. */
  async create(user: SignedInUser, input: CreateSessionInput): Promise<{ session: SessionSummary; state: SessionState }> {
    const nowMs = this.now();
    const { row, entries } = await this.db.transaction(async (m) => {
      // Whoever starts a session leads it from the rail, joined in the same transaction: the roles as they are now.
      const fresh = await this.people.loadUser(user.id, user.venueId);
      if (!fresh || fresh.venueId !== user.venueId) throw new HttpError('forbidden', 'You no longer hold a role at this venue.');
      if (!fresh.roles.includes('rail')) throw new HttpError('forbidden', NOT_RAIL_LEAD_TEXT);
      const venue = await this.schedule.venue(user.venueId, m);
      const ids = input.lineSets.map((l) => l.lineSetId);
      // Lock the line sets: two leads cannot both open sessions on the same set.
      await m.getRepository(LineSetRow).createQueryBuilder('l').setLock('pessimistic_write')
        .where('l.venue_id = :venueId AND l.id IN (:...ids)', { venueId: user.venueId, ids }).getMany();
      const lineSets = await this.schedule.lineSets(user.venueId, m, ids);
      const missing = ids.filter((id) => !lineSets.some((l) => l.id === id));
      if (missing.length) throw new HttpError('bad-input', `No such line set at this venue: ${missing.join(', ')}.`, { lineSets: ['Unknown line set'] });
      await this.refuseBusyLineSets(m, user.venueId, ids);
      // The bridge stock is planned with: lock it so two sessions opened at once read it in turn.
      await m.getRepository(BrickTypeRow).createQueryBuilder('b').setLock('pessimistic_write')
        .where('b.venue_id = :venueId', { venueId: user.venueId }).getMany();

      const planned = planSession({ venue, lineSets, brickTypes: await this.schedule.brickTypes(user.venueId, m) }, input);
      const errors = sessionPlanErrors(planned);
      if (errors.length) throw new HttpError('bad-input', `The plan cannot be run: ${errors.join(' ')}`, { lineSets: errors });
      let state: SessionState;
      try {
        state = createSessionState({
          lineSets: planned.map((p) => ({
            id: lineSetKey(p.scheduleId),
            name: p.name,
            steps: p.result.steps,
            load: { purchase: p.input.purchase, pipeKg: p.input.pipeKg, arborKg: p.input.arborKg, pieces: p.input.pieces, bricks: p.input.bricks },
            brickTypes: p.input.brickTypes,
            ropeLockLimitKg: p.input.ropeLockLimitKg,
            pieceNames: p.pieceNames,
            ...(p.input.arborCapacityKg !== undefined ? { arborCapacityKg: p.input.arborCapacityKg } : {}),
          })),
          // The venue's units go with the session: every sentence it writes (corrections, refusals, the log) uses them.
          settings: { minCrew: venue.settings.minCrew, reAlertSeconds: venue.settings.reAlertSeconds, units: venue.units, spreaderSpacingM: venue.settings.spreaderPlateEveryM },
          // The bridge as the plan starts from; every brick step moves it, and corrections load from it.
          bridgeStock: { ...planned[0]?.input.bridgeStock },
        });
      } catch (error) {
        if (error instanceof SessionPlanError) throw new HttpError('bad-input', `The plan cannot be run: ${error.message}`);
        throw error;
      }
      const row = await m.getRepository(LoadingSessionRow).save(m.getRepository(LoadingSessionRow).create({
        venueId: user.venueId,
        title: input.title,
        phase: state.phase,
        state,
        plan: {
          lineSets: planned.map((p) => ({ scheduleId: p.scheduleId, key: lineSetKey(p.scheduleId), newPieces: p.newPieces, warnings: p.warnings })),
        },
        createdBy: user.id,
        createdAtMs: nowMs,
        lastSeq: 0,
        lastHash: '',
        reAlertDueMs: null,
      }));
      row.lastHash = genesisHash(row);
      const opened = await appendEntries(m, row, [{
        kind: 'session-opened',
        role: null,
        details: { title: input.title, lineSets: planned.map((p) => ({ id: lineSetKey(p.scheduleId), name: p.name, steps: p.result.steps.length })) },
      }], { personId: user.id, personName: user.name, clientTimeMs: null }, nowMs);
      // The one who starts it joins as lead through the same rules as any join, logged as their own entry.
      const joined = decide(row.state, { type: 'join', role: 'rail' }, { personId: fresh.id, name: fresh.name, venueRoles: fresh.roles }, nowMs);
      if (!joined.ok) throw new HttpError('forbidden', joined.reason);
      row.state = joined.state;
      row.phase = joined.state.phase;
      const entries = [...opened, ...await appendEntries(m, row, joined.entries, { personId: fresh.id, personName: fresh.name, clientTimeMs: null }, nowMs)];
      await m.getRepository(LoadingSessionRow).update({ id: row.id }, { state: row.state, phase: row.phase, lastSeq: row.lastSeq, lastHash: row.lastHash });
      return { row, entries };
    });
    this.committed(row.id, user.venueId, entries, row.state);
    return { session: this.summary(row, user.name), state: row.state };
  }

  private async refuseBusyLineSets(m: EntityManager, venueId: number, ids: number[]): Promise<void> {
    const open = await m.getRepository(LoadingSessionRow).createQueryBuilder('s')
      .where("s.venue_id = :venueId AND s.phase <> 'finished'", { venueId }).getMany();
    for (const s of open) {
      const busy = s.plan.lineSets.filter((l) => ids.includes(l.scheduleId));
      if (busy.length) {
        throw new HttpError('conflict', `${s.state.lineSets.find((l) => l.id === busy[0].key)?.name ?? 'A line set'} is already in the open session "${s.title}". Finish or end that session first.`);
      }
    }
  }

  async list(user: SignedInUser, activeOnly: boolean): Promise<SessionSummary[]> {
    const qb = this.db.getRepository(LoadingSessionRow).createQueryBuilder('s')
      .where('s.venue_id = :venueId', { venueId: user.venueId }).orderBy('s.id', 'DESC').limit(100);
    if (activeOnly) qb.andWhere("s.phase <> 'finished'");
    const rows = await qb.getMany();
    const names = await this.names(rows.map((r) => r.createdBy));
    return rows.map((r) => this.summary(r, names.get(r.createdBy) ?? ''));
  }

  /** The person as the database knows them now (roles removed or moved since the socket opened count). */
  async stillAtVenue(user: SignedInUser): Promise<SignedInUser> {
    const fresh = await this.people.loadUser(user.id, user.venueId);
    if (!fresh || fresh.venueId !== user.venueId) throw new HttpError('forbidden', 'You no longer hold a role at this venue.');
    return fresh;
  }

  async get(user: SignedInUser, id: number): Promise<{ session: SessionSummary; state: SessionState; lastSeq: number }> {
    const row = await this.row(user, id);
    const names = await this.names([row.createdBy]);
    return { session: this.summary(row, names.get(row.createdBy) ?? ''), state: row.state, lastSeq: row.lastSeq };
  }

  /** The kept record for export: every entry, and what a reader needs to check the chain end to end. */
  async record(user: SignedInUser, id: number) {
    const row = await this.row(user, id);
    const entries = (await this.eventRows(id, 0)).map(toLogEntry);
    const names = await this.names([row.createdBy]);
    return {
      session: this.summary(row, names.get(row.createdBy) ?? ''),
      venueId: row.venueId,
      genesisHash: genesisHash(row),
      lastSeq: row.lastSeq,
      lastHash: row.lastHash,
      entries,
    };
  }

  /** One page of the log after a sequence number: a phone that reconnects asks for exactly what it missed. */
  async events(user: SignedInUser, id: number, afterSeq: number, limit = EVENTS_PAGE_LIMIT): Promise<EventsPage<LogEntry>> {
    const row = await this.row(user, id);
    // One more than the page holds tells whether another page follows.
    const rows = await this.eventRows(id, afterSeq, limit + 1);
    const page = rows.slice(0, limit).map(toLogEntry);
    return {
      entries: page,
      lastSeq: Math.max(row.lastSeq, page.at(-1)?.seq ?? 0),
      more: rows.length > limit,
      nextAfter: page.at(-1)?.seq ?? afterSeq,
    };
  }

  private eventRows(id: number, afterSeq: number, limit?: number): Promise<SessionEventRow[]> {
    const qb = this.db.getRepository(SessionEventRow).createQueryBuilder('e')
      .where('e.session_id = :id AND e.seq > :afterSeq', { id, afterSeq }).orderBy('e.seq', 'ASC');
    return (limit ? qb.limit(limit) : qb).getMany();
  }

  /**
   * One action from a phone (HTTP or socket alike): validated, then decided with the session row
   * locked (SELECT ... FOR UPDATE) so actions from two phones are taken one after the other, and the
   * decision, its log entries and the key's answer are written in the same transaction.
   */
  async act(user: SignedInUser, sessionId: number, rawEnvelope: unknown, signInId?: string): Promise<ActOutcome> {
    const envelope = parseInput(actionEnvelopeSchema, rawEnvelope, 'action');
    return this.decideAndRecord(user, sessionId, envelope, 'person', false, signInId);
  }

  /** Railcall's own action (re-alerts), decided and logged like anyone's. */
  async actAsSystem(venueId: number, sessionId: number, action: AnyAction): Promise<ActOutcome> {
    const user: SignedInUser = { id: SYSTEM_ACTOR.personId, name: SYSTEM_ACTOR.name, email: '', venueId, roles: [], venueIds: [venueId] };
    return this.decideAndRecord(user, sessionId, { key: '', clientTimeMs: 0, action: action as ActionEnvelope['action'] }, 'system');
  }

  /**
   * The re-alert due now, if any: claimed under the session's row lock, so however many server
   * processes try at the same moment, exactly one writes it and the others find it no longer due.
   */
  async reAlertIfDue(venueId: number, sessionId: number): Promise<ActOutcome> {
    const user: SignedInUser = { id: SYSTEM_ACTOR.personId, name: SYSTEM_ACTOR.name, email: '', venueId, roles: [], venueIds: [venueId] };
    return this.decideAndRecord(user, sessionId, { key: '', clientTimeMs: 0, action: { type: 're-alert', personIds: [] } as AnyAction as ActionEnvelope['action'] }, 'system', true);
  }

  /**
   * Decides with the session row locked. A person's roles are read in the same round trip, after the
   * lock: the roles held right now, not those at sign-in, so a removed role stops working at once.
   * With `signInId` (a socket's action) the sign-in itself is read in that trip too: ended → SignInEnded,
   * another venue chosen since → SignInMoved; nothing is written in either case.
   */
  private async decideAndRecord(signedIn: SignedInUser, sessionId: number, envelope: ActionEnvelope, who: 'person' | 'system', claimReAlert = false, signInId?: string): Promise<ActOutcome> {
    let outcome: ActOutcome;
    let user = signedIn;
    try {
      outcome = await this.locks.run(sessionId, signedIn.venueId, async ({ row, alsoRead, manager, commit }): Promise<ActOutcome> => {
        let actor: Actor = SYSTEM_ACTOR;
        if (who === 'person') {
          let wanted = signedIn.venueId;
          if (signInId !== undefined) {
            const signIn = signInNowOf(alsoRead[1], signedIn.id);
            if (!signIn.alive) throw new SignInEnded();
            wanted = signIn.venueId ?? wanted;
          }
          // The venue the sign-in acts on now (the chosen one while a role is held there, as on every request).
          const fresh = signedInUserOf(alsoRead[0] as PersonRoleSqlRow[], wanted);
          if (signInId !== undefined && fresh && fresh.venueId !== signedIn.venueId) throw new SignInMoved();
          if (!fresh || fresh.venueId !== signedIn.venueId) throw notFound('That loading session');
          user = fresh;
          actor = { personId: fresh.id, name: fresh.name, venueRoles: fresh.roles };
        }
        if (!row) throw notFound('That loading session');
        const nowMs = this.now();
        if (claimReAlert) {
          const due = silentSince(row.state, nowMs).filter((p) => p.due).map((p) => p.personId);
          // Decided from the locked state, not the timer's copy: whoever claimed it first has already moved it on.
          if (due.length === 0) return { answer: { ok: true, seq: row.lastSeq, state: row.state }, entries: [], state: row.state };
          envelope = { ...envelope, action: { type: 're-alert', personIds: due } as AnyAction as ActionEnvelope['action'] };
        }
        const before = row.state;
        const decision = decide(before, envelope.action as AnyAction, actor, nowMs);
        const isSystem = actor.personId === SYSTEM_ACTOR.personId;
        const author = { personId: isSystem ? null : user.id, personName: user.name, clientTimeMs: isSystem ? null : envelope.clientTimeMs };
        const entries = chainEntries(row, decision.ok ? decision.entries : [decision.entry], author, nowMs);
        if (decision.ok) {
          row.state = decision.state;
          row.phase = decision.state.phase;
          await writeBackSchedule(manager, user.venueId, row.plan, before, decision.state, {
            personId: user.id, personName: user.name, sessionId: row.id, via: 'loading session', reason: `Written back by the loading session "${row.title}"`,
          });
        }
        row.reAlertDueMs = nextReAlertAtMs(row.state);
        const answer: StoredAnswer = decision.ok
          ? { ok: true, seq: row.lastSeq }
          : { ok: false, seq: row.lastSeq, error: refusalToApiError(decision) };
        // The key's row goes in last, under the session lock: a key seen before fails there and the
        // whole attempt rolls back (one query less per action than looking the key up first).
        const key = envelope.key ? { sessionId, key: envelope.key, personId: user.id, actionHash: actionHash(envelope.action), answer, createdAtMs: nowMs } : null;
        await commit(entries, key).catch((error) => { throw isDuplicateKey(error) ? new KeyTaken() : error; });
        return { answer: restore(answer, row.state), entries, state: row.state };
      }, who === 'person' ? [
        { sql: PERSON_WITH_ROLES_SQL, params: [signedIn.id] },
        ...(signInId !== undefined ? [signInStatement(signInId, Date.now()) /* the store's clock, not the session's */] : []),
      ] : []);
    } catch (error) {
      if (!(error instanceof KeyTaken)) throw error;
      return this.answerAgain(user, sessionId, envelope);
    }
    this.committed(sessionId, user.venueId, outcome.entries, outcome.state);
    return outcome;
  }

  /** A retry (the key's first attempt has committed, maybe while this one waited for the lock): its first answer, nothing done again. */
  private async answerAgain(user: SignedInUser, sessionId: number, envelope: ActionEnvelope): Promise<ActOutcome> {
    const prior = await this.db.getRepository(ActionKeyRow).findOneBy({ sessionId, key: envelope.key });
    const row = await this.db.getRepository(LoadingSessionRow).findOneBy({ id: sessionId, venueId: user.venueId });
    if (!prior || !row) throw notFound('That loading session');
    if (prior.personId !== user.id || prior.actionHash !== actionHash(envelope.action)) {
      throw new HttpError('conflict', 'That action key was already used for another action. The phone makes a new key for each tap: reload and try again.');
    }
    return { answer: restore(prior.answer, row.state), entries: [], state: row.state };
  }

  /** A session's newest entry and state, whatever the venue (for phones already admitted to its room). */
  async latest(sessionId: number): Promise<{ entry: LogEntry; state: SessionState } | null> {
    const row = await this.db.getRepository(LoadingSessionRow).findOneBy({ id: sessionId });
    const last = row && await this.db.getRepository(SessionEventRow).findOneBy({ sessionId, seq: row.lastSeq });
    return row && last ? { entry: toLogEntry(last), state: row.state } : null;
  }

  /** Sessions still going, for the re-alert timer after a restart. */
  async openSessions(): Promise<Array<{ id: number; venueId: number; state: SessionState }>> {
    const rows = await this.db.getRepository(LoadingSessionRow).createQueryBuilder('s').where("s.phase = 'loading'").getMany();
    return rows.map((r) => ({ id: r.id, venueId: r.venueId, state: r.state }));
  }

  /** Sessions whose re-alert is due by `untilMs`, whichever server process wrote them. */
  async reAlertsDueBy(untilMs: number): Promise<Array<{ id: number; venueId: number; dueMs: number }>> {
    const rows = await this.db.getRepository(LoadingSessionRow).createQueryBuilder('s').select(['s.id', 's.venueId', 's.reAlertDueMs'])
      .where('s.re_alert_due_ms <= :untilMs', { untilMs }).getMany();
    return rows.map((r) => ({ id: r.id, venueId: r.venueId, dueMs: r.reAlertDueMs! }));
  }

  private async row(user: SignedInUser, id: number): Promise<LoadingSessionRow> {
    // Another venue's session is answered exactly like one that does not exist.
    const row = await this.db.getRepository(LoadingSessionRow).findOneBy({ id, venueId: user.venueId });
    if (!row) throw notFound('That loading session');
    return row;
  }

  private async names(ids: number[]): Promise<Map<number, string>> {
    if (ids.length === 0) return new Map();
    const people = await this.db.getRepository(Person).createQueryBuilder('p').where('p.id IN (:...ids)', { ids: [...new Set(ids)] }).getMany();
    return new Map(people.map((p) => [p.id, p.name]));
  }

  private summary(row: LoadingSessionRow, createdByName: string): SessionSummary {
    return {
      id: row.id,
      title: row.title,
      phase: row.phase,
      createdAtMs: row.createdAtMs,
      createdByName,
      lineSets: row.state.lineSets.map((l) => ({ id: l.id, name: l.name })),
    };
  }
}

/** The action key was there before this attempt: roll it back and answer as the first time. */
class KeyTaken extends Error {}
const isDuplicateKey = (error: unknown) => {
  const e = error as { code?: string; driverError?: { code?: string } };
  return (e.code ?? e.driverError?.code) === 'ER_DUP_ENTRY';
};

const actionHash = (action: unknown) => createHash('sha256').update(canonicalJson(action)).digest('hex');

function restore(answer: StoredAnswer, state: SessionState): ActOutcome['answer'] {
  return answer.ok ? { ok: true, seq: answer.seq, state } : { ok: false, seq: answer.seq, error: answer.error as ApiError };
}
