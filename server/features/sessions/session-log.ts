import type { EntityManager } from 'typeorm';
import type { LogDraft, LogEntry } from '@shared/protocol/session';
import { entryHash } from './hash-chain';
import type { LoadingSessionRow, SessionEventRow } from './session.entity';
import { insertEntries } from './hot-path';

export interface EntryAuthor {
  personId: number | null;
  personName: string;
  clientTimeMs: number | null;
}

/**
 * Appends drafts to a session's log inside the caller's transaction, with the session row already
 * locked: the next sequence numbers and the hash chain follow on from the row's last_seq/last_hash.
 * Moves the row's counters on; the caller saves the row.
 */
export async function appendEntries(m: EntityManager, row: LoadingSessionRow, drafts: LogDraft[], author: EntryAuthor, nowMs: number): Promise<LogEntry[]> {
  const entries = chainEntries(row, drafts, author, nowMs);
  await insertEntries(m, row.id, entries);
  return entries;
}

/** The entries the drafts become, numbered and chained on from the row (moved on), not yet written. */
export function chainEntries(row: Pick<LoadingSessionRow, 'lastSeq' | 'lastHash'>, drafts: LogDraft[], author: EntryAuthor, nowMs: number): LogEntry[] {
  const entries: LogEntry[] = [];
  for (const draft of drafts) {
    // Railcall's own entries (its closing "finished", re-alerts) have no person, whoever tapped last.
    const own = draft.role === 'system';
    const unsigned: Omit<LogEntry, 'hash'> = {
      seq: row.lastSeq + 1,
      serverTimeMs: nowMs,
      clientTimeMs: own ? null : author.clientTimeMs,
      personId: own ? null : author.personId,
      personName: own ? 'Railcall' : author.personName,
      role: draft.role ?? null,
      kind: draft.kind,
      lineSetId: draft.lineSetId ?? null,
      stepIndex: draft.stepIndex ?? null,
      details: draft.details,
      prevHash: row.lastHash,
    };
    const entry: LogEntry = { ...unsigned, hash: entryHash(unsigned) };
    entries.push(entry);
    row.lastSeq = entry.seq;
    row.lastHash = entry.hash;
  }
  return entries;
}

export function toLogEntry(row: SessionEventRow): LogEntry {
  return {
    seq: row.seq,
    serverTimeMs: row.serverTimeMs,
    clientTimeMs: row.clientTimeMs,
    personId: row.personId,
    personName: row.personName,
    role: row.role as LogEntry['role'],
    kind: row.kind,
    lineSetId: row.lineSetId,
    stepIndex: row.stepIndex,
    details: row.details,
    hash: row.hash,
    prevHash: row.prevHash,
  };
}
