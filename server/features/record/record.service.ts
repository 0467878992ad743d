import type { DataSource } from 'typeorm';
import { lineSetKey } from '@shared/protocol/sessions-api';
import { withDefaultSettings } from '@shared/protocol/schedule';
import {
  dayStartMs, exportedRecordSchema, venueTimeZone,
  type ChainCheck, type HistoryAnswer, type HistoryQuery, type HistoryRow, type LineSetRecord, type SessionReport, type VerifyAnswer,
} from '@shared/protocol/record';
import type { LogEntry } from '@shared/protocol/session';
import { HttpError, notFound } from '../../middleware/http-error';
import { fieldErrors } from '../../middleware/validate';
import { Person } from '../people/person.entity';
import { VenueRole } from '../people/venue-role.entity';
import { LineSetRow } from '../schedule/line-set.entity';
import { Venue } from '../venue/venue.entity';
import { LoadingSessionRow, SessionEventRow } from '../sessions/session.entity';
import { toLogEntry } from '../sessions/session-log';
import { genesisHash, verifyChain } from '../sessions/hash-chain';
import { buildReport, outcomeOf } from './report';

const DAY_MS = 86_400_000;
/** Most sessions one history answer lists (newest first). */
export const HISTORY_LIMIT = 200;

/** The kept record of a venue's sessions: read only; the log itself is append-only for the app. */
export class RecordService {
  constructor(private readonly db: DataSource) {}

  private async venue(venueId: number) {
    const v = await this.db.getRepository(Venue).findOneByOrFail({ id: venueId });
    const settings = v.settings as unknown as Record<string, unknown>;
    // The same caution the crew see on the schedule and the planner.
    return { name: v.name, units: v.units, timeZone: venueTimeZone(settings), caution: withDefaultSettings(v.settings).caution };
  }

  private async names(ids: number[]): Promise<Map<number, string>> {
    if (!ids.length) return new Map();
    const people = await this.db.getRepository(Person).createQueryBuilder('p').where('p.id IN (:...ids)', { ids: [...new Set(ids)] }).getMany();
    return new Map(people.map((p) => [p.id, p.name]));
  }

  private async row(venueId: number, id: number): Promise<LoadingSessionRow> {
    // Another venue's session is answered exactly like one that does not exist.
    const row = await this.db.getRepository(LoadingSessionRow).findOneBy({ id, venueId });
    if (!row) throw notFound('That loading session');
    return row;
  }

  private async entries(sessionId: number): Promise<LogEntry[]> {
    const rows = await this.db.getRepository(SessionEventRow).createQueryBuilder('e')
      .where('e.session_id = :sessionId', { sessionId }).orderBy('e.seq', 'ASC').getMany();
    return rows.map(toLogEntry);
  }

  private historyRows(rows: LoadingSessionRow[], names: Map<number, string>, leads: Map<number, string>): HistoryRow[] {
    return rows.map((r) => ({
      id: r.id,
      title: r.title,
      startedAtMs: r.state.beganAtMs ?? r.createdAtMs,
      endedAtMs: r.state.endedAtMs,
      leadName: leads.get(r.id) ?? null,
      createdByName: names.get(r.createdBy) ?? '',
      lineSets: r.plan.lineSets.map((l) => ({ scheduleId: l.scheduleId, name: r.state.lineSets.find((s) => s.id === l.key)?.name ?? l.key })),
      outcome: outcomeOf(r.state),
    }));
  }

  /** The lead of each session: the first rail operator to join as lead, from the log. */
  private async leads(sessionIds: number[]): Promise<Map<number, string>> {
    if (!sessionIds.length) return new Map();
    const rows = await this.db.getRepository(SessionEventRow).createQueryBuilder('e')
      .where("e.session_id IN (:...ids) AND e.kind = 'joined' AND e.role = 'rail'", { ids: sessionIds }).orderBy('e.seq', 'ASC').getMany();
    const leads = new Map<number, string>();
    for (const e of rows) if (e.details.lead === true && !leads.has(e.sessionId)) leads.set(e.sessionId, e.personName);
    return leads;
  }

  /** Past and running sessions of the venue, newest first, filtered by line set, dates (venue time zone) and person. */
  async history(venueId: number, q: HistoryQuery): Promise<HistoryAnswer> {
    const venue = await this.venue(venueId);
    const qb = this.db.getRepository(LoadingSessionRow).createQueryBuilder('s').where('s.venue_id = :venueId', { venueId });
    if (q.from) qb.andWhere('s.created_at_ms >= :fromMs', { fromMs: dayStartMs(q.from, venue.timeZone) });
    if (q.to) qb.andWhere('s.created_at_ms < :toMs', { toMs: dayStartMs(q.to, venue.timeZone) + DAY_MS });
    if (q.personId) {
      qb.andWhere('(s.created_by = :personId OR s.id IN (SELECT e.session_id FROM session_event e WHERE e.person_id = :personId))', { personId: q.personId });
    }
    let rows = await qb.orderBy('s.id', 'DESC').limit(q.lineSetId ? HISTORY_LIMIT * 5 : HISTORY_LIMIT).getMany();
    if (q.lineSetId) rows = rows.filter((r) => r.plan.lineSets.some((l) => l.scheduleId === q.lineSetId)).slice(0, HISTORY_LIMIT);
    const [names, leads] = await Promise.all([this.names(rows.map((r) => r.createdBy)), this.leads(rows.map((r) => r.id))]);
    const lineSets = await this.db.getRepository(LineSetRow).find({ where: { venueId }, order: { number: 'ASC' } });
    const roles = await this.db.getRepository(VenueRole).find({ where: { venueId } });
    const people = [...(await this.names(roles.map((r) => r.personId))).entries()]
      .map(([id, name]) => ({ id, name })).sort((a, b) => a.name.localeCompare(b.name));
    return {
      timeZone: venue.timeZone,
      sessions: this.historyRows(rows, names, leads),
      lineSets: lineSets.map((l) => ({ id: l.id, label: `Line set ${l.number} (${l.name})` })),
      people,
    };
  }

  /** A line set's own record: its sessions, every test of balance and every tie-off. */
  async lineSetRecord(venueId: number, lineSetId: number): Promise<LineSetRecord> {
    const ls = await this.db.getRepository(LineSetRow).findOneBy({ id: lineSetId, venueId });
    if (!ls) throw notFound('That line set');
    const venue = await this.venue(venueId);
    const history = await this.history(venueId, { lineSetId });
    const ids = history.sessions.map((s) => s.id);
    const events = ids.length
      ? await this.db.getRepository(SessionEventRow).createQueryBuilder('e')
        .where("e.session_id IN (:...ids) AND e.line_set_id = :key AND e.kind IN ('test-recorded', 'tied-off', 'untied')", { ids, key: lineSetKey(lineSetId) })
        .orderBy('e.server_time_ms', 'DESC').addOrderBy('e.seq', 'DESC').getMany()
      : [];
    return {
      lineSet: { id: ls.id, number: ls.number, name: ls.name },
      timeZone: venue.timeZone,
      units: venue.units,
      sessions: history.sessions,
      tests: events.filter((e) => e.kind === 'test-recorded').map((e) => ({
        sessionId: e.sessionId,
        atMs: e.serverTimeMs,
        byName: e.personName,
        result: String(e.details.result),
        estimateKg: (e.details.estimateKg as number | null) ?? null,
        note: (e.details.note as string | null) ?? null,
        computedKg: typeof e.details.computedImbalanceKg === 'number' ? e.details.computedImbalanceKg : null,
      })),
      tieOffs: events.filter((e) => e.kind !== 'test-recorded').map((e) => ({ sessionId: e.sessionId, atMs: e.serverTimeMs, byName: e.personName, kind: e.kind as 'tied-off' | 'untied' })),
    };
  }

  /** The chain of a stored session, checked end to end against its row's last entry. */
  async check(venueId: number, sessionId: number): Promise<ChainCheck> {
    const row = await this.row(venueId, sessionId);
    return withCount(verifyChain(await this.entries(sessionId), genesisHash(row), row), row.lastSeq);
  }

  /** The session report: the one object the screen, the PDF and the CSV are made from. */
  async report(venueId: number, sessionId: number): Promise<SessionReport> {
    const row = await this.row(venueId, sessionId);
    const [venue, entries, names] = await Promise.all([this.venue(venueId), this.entries(sessionId), this.names([row.createdBy])]);
    const genesis = genesisHash(row);
    return buildReport({
      id: row.id,
      title: row.title,
      venueName: venue.name,
      units: venue.units,
      timeZone: venue.timeZone,
      caution: venue.caution,
      openedAtMs: row.createdAtMs,
      createdByName: names.get(row.createdBy) ?? '',
      state: row.state,
      scheduleIds: Object.fromEntries(row.plan.lineSets.map((l) => [l.key, l.scheduleId])),
      entries,
      genesisHash: genesis,
      lastSeq: row.lastSeq,
      lastHash: row.lastHash,
      chain: withCount(verifyChain(entries, genesis, row), row.lastSeq),
    });
  }

  /**
   * Checks an exported file: its own chain from its genesis hash to its last entry, and, when it
   * names its session, that the genesis hash is the one that session was given.
   */
  verifyExport(text: string): VerifyAnswer {
    let json: unknown;
    try {
      json = JSON.parse(text);
    } catch {
      throw new HttpError('bad-input', 'That file is not a session record: it is not JSON.', { file: ['Choose a session record exported from Railcall (.json)'] });
    }
    const parsed = exportedRecordSchema.safeParse(json);
    if (!parsed.success) {
      throw new HttpError('bad-input', 'That file is not a session record exported from Railcall.', { file: ['Not a session record', ...Object.entries(fieldErrors(parsed.error)).slice(0, 5).map(([k, v]) => `${k}: ${v[0]}`)] });
    }
    const file = parsed.data;
    const entries = file.entries as LogEntry[];
    const named = json as { session?: { id?: unknown; createdAtMs?: unknown; title?: unknown }; venueId?: unknown };
    const title = typeof named.session?.title === 'string' ? named.session.title : null;
    if (typeof named.session?.id === 'number' && typeof named.session.createdAtMs === 'number' && typeof named.venueId === 'number') {
      const expected = genesisHash({ id: named.session.id, venueId: named.venueId, createdAtMs: named.session.createdAtMs });
      if (expected !== file.genesisHash) {
        return { chain: { ok: false, atSeq: 0, problem: 'the genesis hash is not the one this session was given' }, sessionTitle: title, entries: entries.length };
      }
    }
    return { chain: withCount(verifyChain(entries, file.genesisHash, file), entries.length), sessionTitle: title, entries: entries.length };
  }
}

function withCount(check: ReturnType<typeof verifyChain>, entries: number): ChainCheck {
  return check.ok ? { ok: true, entries } : check;
}
