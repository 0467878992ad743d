import { createHash } from 'node:crypto';
import { entryHashText, type LogEntry } from '@shared/protocol/session';

/**
 * The previous hash of a session's first entry: bound to the session, so one session's chain
 * cannot pass for another's.
 */
export function genesisHash(session: { id: number; venueId: number; createdAtMs: number }): string {
  return createHash('sha256').update(`railcall-session:${session.venueId}:${session.id}:${session.createdAtMs}`).digest('hex');
}

/** SHA-256 (hex) of the entry's canonical text (keys sorted at every depth), which includes prevHash. */
export function entryHash(entry: Omit<LogEntry, 'hash'>): string {
  return createHash('sha256').update(entryHashText(entry)).digest('hex');
}

export type ChainCheck = { ok: true } | { ok: false; atSeq: number; problem: string };

/**
 * Checks an exported record: gapless from 1, starting from the session's genesis hash, each entry
 * linked to the one before, every hash recomputed, and (when given) ending at the session's last
 * sequence number and hash, so a record cut short is caught too.
 */
export function verifyChain(entries: LogEntry[], genesis: string, tail?: { lastSeq: number; lastHash: string }): ChainCheck {
  let prev = genesis;
  for (const [i, e] of entries.entries()) {
    if (e.seq !== i + 1) return { ok: false, atSeq: e.seq, problem: `expected entry ${i + 1} here` };
    if (e.prevHash !== prev) return { ok: false, atSeq: e.seq, problem: 'not linked to the entry before it' };
    const { hash, ...rest } = e;
    if (entryHash(rest) !== hash) return { ok: false, atSeq: e.seq, problem: 'its content does not match its hash' };
    prev = hash;
  }
  if (tail && (entries.length !== tail.lastSeq || prev !== (tail.lastSeq ? tail.lastHash : genesis))) {
    return { ok: false, atSeq: entries.length, problem: `the record ends at entry ${entries.length}, the session at ${tail.lastSeq}` };
  }
  return { ok: true };
}
