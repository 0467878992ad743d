import { DataSource, type DataSourceOptions, type EntityManager, type QueryRunner } from 'typeorm';
import type { LogEntry, SessionState } from '@shared/protocol/session';
import type { LoadingSessionRow, StoredAnswer, StoredPlan } from './session.entity';

/**
 * The statements every action runs, as plain SQL sent in two round trips: "begin and lock the session
 * row", then "write the entries, the row and the key's answer, and commit". The load benchmark's
 * profile put TypeORM's query builder at a fifth of the server's CPU per action and the socket writes
 * to MariaDB (one per statement) at a quarter. The entities stay the schema's description; these follow them.
 */

const json = <T>(v: unknown): T => (typeof v === 'string' ? JSON.parse(v) : v) as T;
const numOrNull = (v: unknown): number | null => (v === null || v === undefined ? null : Number(v));

interface SessionSqlRow {
  id: number; venue_id: number; title: string; phase: string; state: unknown; plan: unknown;
  created_by: number; created_at_ms: unknown; last_seq: number; last_hash: string; re_alert_due_ms: unknown;
}

const LOCK_SESSION = `SELECT id, venue_id, title, phase, state, plan, created_by, created_at_ms, last_seq, last_hash, re_alert_due_ms
  FROM loading_session WHERE id = ? AND venue_id = ? FOR UPDATE`;

function sessionRowOf(r: SessionSqlRow | undefined): LoadingSessionRow | null {
  if (!r) return null;
  return {
    id: Number(r.id),
    venueId: Number(r.venue_id),
    title: r.title,
    phase: r.phase as LoadingSessionRow['phase'],
    state: json<SessionState>(r.state),
    plan: json<StoredPlan>(r.plan),
    createdBy: Number(r.created_by),
    createdAtMs: Number(r.created_at_ms),
    lastSeq: Number(r.last_seq),
    lastHash: r.last_hash,
    reAlertDueMs: numOrNull(r.re_alert_due_ms),
  };
}

export interface Statement { sql: string; params: unknown[] }

function insertEntriesStatement(sessionId: number, entries: LogEntry[]): Statement | null {
  if (entries.length === 0) return null;
  const params: unknown[] = [];
  for (const e of entries) {
    params.push(sessionId, e.seq, e.serverTimeMs, e.clientTimeMs, e.personId, e.personName, e.role, e.kind, e.lineSetId, e.stepIndex, JSON.stringify(e.details), e.prevHash, e.hash);
  }
  return {
    sql: `INSERT INTO session_event (session_id, seq, server_time_ms, client_time_ms, person_id, person_name, role, kind, line_set_id, step_index, details, prev_hash, hash)
      VALUES ${entries.map(() => '(?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?)').join(', ')}`,
    params,
  };
}

/** Log entries in one statement, in sequence order, in the caller's transaction. */
export async function insertEntries(m: EntityManager, sessionId: number, entries: LogEntry[]): Promise<void> {
  const statement = insertEntriesStatement(sessionId, entries);
  if (statement) await m.query(statement.sql, statement.params);
}

export interface ActionKey { sessionId: number; key: string; personId: number; actionHash: string; answer: StoredAnswer; createdAtMs: number }

/** A session row locked inside an open transaction, and the one way to finish it with writes. */
export interface LockedSession {
  row: LoadingSessionRow | null;
  /** What each of `alsoRead` answered, in order, read after the lock was taken (so the reads see everything committed before it). */
  alsoRead: unknown[][];
  /** For the rare extra writes inside the same transaction (the schedule written back after a test). */
  manager: EntityManager;
  /**
   * Writes the entries, the row (state, log head, next re-alert) and the key's first answer, then
   * commits, all in one round trip. A key seen before fails with ER_DUP_ENTRY and nothing is kept.
   */
  commit(entries: LogEntry[], key: ActionKey | null): Promise<void>;
}

/**
 * Runs `work` with the session row locked (SELECT … FOR UPDATE), so actions on one session are taken
 * one after another; rolls back if `work` throws or does not commit. Its own small pool allows several
 * statements per round trip, and only these fixed statements are ever sent through it.
 */
export class SessionLocks {
  private source: Promise<DataSource> | null = null;

  constructor(private readonly db: DataSource) {}

  async run<T>(sessionId: number, venueId: number, work: (locked: LockedSession) => Promise<T>, alsoRead: Statement[] = []): Promise<T> {
    const runner = (await this.pool()).createQueryRunner();
    let open = false;
    try {
      // The extra read comes after the lock: InnoDB takes the transaction's snapshot at its first plain
      // read, which must not be older than the previous action on this session.
      const [, rows, ...extra] = await runner.query(
        [`START TRANSACTION`, LOCK_SESSION, ...alsoRead.map((r) => r.sql)].join(';\n'),
        [sessionId, venueId, ...alsoRead.flatMap((r) => r.params)],
      ) as [unknown, SessionSqlRow[], ...unknown[][]];
      open = true;
      // TypeORM must not start (and so implicitly commit) a transaction of its own for a save inside this one.
      (runner as QueryRunner & { isTransactionActive: boolean }).isTransactionActive = true;
      const locked: LockedSession = {
        row: sessionRowOf(rows[0]),
        alsoRead: extra,
        manager: runner.manager,
        commit: async (entries, key) => {
          await runner.query(...finishStatement(locked.row, entries, key));
          open = false;
        },
      };
      const result = await work(locked);
      if (open) await runner.query('ROLLBACK');
      open = false;
      return result;
    } catch (error) {
      if (open) await runner.query('ROLLBACK').catch(() => undefined);
      throw error;
    } finally {
      (runner as QueryRunner & { isTransactionActive: boolean }).isTransactionActive = false;
      await runner.release();
    }
  }

  async close(): Promise<void> {
    const source = this.source;
    this.source = null;
    if (source) await source.then((s) => s.destroy(), () => undefined);
  }

  private pool(): Promise<DataSource> {
    this.source ??= new DataSource({
      ...this.db.options,
      migrations: [],
      extra: { ...(this.db.options as { extra?: object }).extra, multipleStatements: true },
    } as DataSourceOptions).initialize().catch((error: unknown) => {
      // The database was out of reach: the next action tries again from scratch.
      this.source = null;
      throw error;
    });
    return this.source;
  }
}

function finishStatement(row: LoadingSessionRow | null, entries: LogEntry[], key: ActionKey | null): [string, unknown[]] {
  if (!row) throw new Error('No session row to write');
  const parts: Statement[] = [];
  const insert = insertEntriesStatement(row.id, entries);
  if (insert) parts.push(insert);
  parts.push({
    sql: 'UPDATE loading_session SET state = ?, phase = ?, last_seq = ?, last_hash = ?, re_alert_due_ms = ? WHERE id = ?',
    params: [JSON.stringify(row.state), row.phase, row.lastSeq, row.lastHash, row.reAlertDueMs, row.id],
  });
  if (key) {
    parts.push({
      sql: 'INSERT INTO session_action_key (session_id, action_key, person_id, action_hash, answer, created_at_ms) VALUES (?, ?, ?, ?, ?, ?)',
      params: [key.sessionId, key.key, key.personId, key.actionHash, JSON.stringify(key.answer), key.createdAtMs],
    });
  }
  parts.push({ sql: 'COMMIT', params: [] });
  return [parts.map((p) => p.sql).join(';\n'), parts.flatMap((p) => p.params)];
}
