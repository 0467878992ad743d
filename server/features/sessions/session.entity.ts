import { Column, Entity, PrimaryColumn, PrimaryGeneratedColumn } from 'typeorm';
import type { SessionPhase, SessionState } from '@shared/protocol/session';
import type { PlanWarning } from '@shared/rigging';

/** What the server keeps of the plan beside the state: how session piece ids map back to the schedule. */
export interface StoredPlan {
  lineSets: Array<{
    /** line_set.id in the schedule. */
    scheduleId: number;
    /** The id inside the session state (lineSetKey). */
    key: string;
    newPieces: Array<{ key: string; name: string; massKg: number; positionM: number | null }>;
    warnings: PlanWarning[];
  }>;
}

@Entity({ name: 'loading_session' })
export class LoadingSessionRow {
  @PrimaryGeneratedColumn({ type: 'int', unsigned: true })
  id: number;

  @Column({ type: 'int', unsigned: true, name: 'venue_id' })
  venueId: number;

  @Column({ type: 'varchar', length: 120 })
  title: string;

  @Column({ type: 'varchar', length: 20 })
  phase: SessionPhase;

  @Column({ type: 'json' })
  state: SessionState;

  @Column({ type: 'json' })
  plan: StoredPlan;

  @Column({ type: 'int', unsigned: true, name: 'created_by' })
  createdBy: number;

  @Column({ type: 'bigint', unsigned: true, name: 'created_at_ms', transformer: { to: (v: number) => v, from: (v: string | number) => Number(v) } })
  createdAtMs: number;

  @Column({ type: 'int', unsigned: true, name: 'last_seq' })
  lastSeq: number;

  @Column({ type: 'char', length: 64, name: 'last_hash' })
  lastHash: string;

  /** When the next re-alert is due (ms, server clock), null when nobody owes an answer. Any server process may claim it. */
  @Column({ type: 'bigint', unsigned: true, name: 're_alert_due_ms', nullable: true, transformer: { to: (v: number | null) => v, from: (v: string | number | null) => (v === null ? null : Number(v)) } })
  reAlertDueMs: number | null;
}

const bigint = { to: (v: number | null) => v, from: (v: string | number | null) => (v === null ? null : Number(v)) };

/** When each person last had a session open on a phone (who is connected now comes from the sockets themselves). */
@Entity({ name: 'session_presence' })
export class PresenceRow {
  @PrimaryColumn({ type: 'int', unsigned: true, name: 'session_id' })
  sessionId: number;

  @PrimaryColumn({ type: 'int', unsigned: true, name: 'person_id' })
  personId: number;

  @Column({ type: 'varchar', length: 120, name: 'person_name' })
  personName: string;

  @Column({ type: 'bigint', unsigned: true, name: 'last_seen_ms', transformer: bigint })
  lastSeenMs: number;
}

/** One entry of the kept record. Inserted, never updated: the app's account has no UPDATE or DELETE here. */
@Entity({ name: 'session_event' })
export class SessionEventRow {
  @PrimaryColumn({ type: 'int', unsigned: true, name: 'session_id' })
  sessionId: number;

  @PrimaryColumn({ type: 'int', unsigned: true })
  seq: number;

  @Column({ type: 'bigint', unsigned: true, name: 'server_time_ms', transformer: bigint })
  serverTimeMs: number;

  @Column({ type: 'bigint', unsigned: true, name: 'client_time_ms', nullable: true, transformer: bigint })
  clientTimeMs: number | null;

  @Column({ type: 'int', unsigned: true, name: 'person_id', nullable: true })
  personId: number | null;

  @Column({ type: 'varchar', length: 120, name: 'person_name' })
  personName: string;

  @Column({ type: 'varchar', length: 20, nullable: true })
  role: string | null;

  @Column({ type: 'varchar', length: 40 })
  kind: string;

  @Column({ type: 'varchar', length: 64, name: 'line_set_id', nullable: true })
  lineSetId: string | null;

  @Column({ type: 'int', unsigned: true, name: 'step_index', nullable: true })
  stepIndex: number | null;

  @Column({ type: 'json' })
  details: Record<string, unknown>;

  @Column({ type: 'char', length: 64, name: 'prev_hash' })
  prevHash: string;

  @Column({ type: 'char', length: 64 })
  hash: string;
}

/** The first answer to an action key: a retry with the same key gets it again and changes nothing. */
@Entity({ name: 'session_action_key' })
export class ActionKeyRow {
  @PrimaryColumn({ type: 'int', unsigned: true, name: 'session_id' })
  sessionId: number;

  @PrimaryColumn({ type: 'varchar', length: 64, name: 'action_key' })
  key: string;

  @Column({ type: 'int', unsigned: true, name: 'person_id' })
  personId: number;

  /** SHA-256 of the action's canonical text: a key reused for another action is refused. */
  @Column({ type: 'char', length: 64, name: 'action_hash' })
  actionHash: string;

  @Column({ type: 'json' })
  answer: StoredAnswer;

  @Column({ type: 'bigint', unsigned: true, name: 'created_at_ms', transformer: bigint })
  createdAtMs: number;
}

export type StoredAnswer = { ok: true; seq: number } | { ok: false; seq: number; error: { code: string; message: string } };
