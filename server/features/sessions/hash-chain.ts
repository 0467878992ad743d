import { createHash } from 'node:crypto';
import { entryHashText, type LogEntry } from '@shared/protocol/session';

/** The previous hash of every session's first entry. */
export const GENESIS_HASH = '';

/** SHA-256 (hex) of the entry's canonical text (keys sorted at every depth), which includes prevHash. */
export function entryHash(entry: Omit<LogEntry, 'hash'>): string {
  return createHash('sha256').update(entryHashText(entry)).digest('hex');
}

export type ChainCheck = { ok: true } | { ok: false; atSeq: number; problem: string };

/** Checks an exported record: gapless from 1, each entry linked to the one before, every hash recomputed. */
export function verifyChain(entries: LogEntry[]): ChainCheck {
  let prev = GENESIS_HASH;
  for (const [i, e] of entries.entries()) {
    if (e.seq !== i + 1) return { ok: false, atSeq: e.seq, problem: `expected entry ${i + 1} here` };
    if (e.prevHash !== prev) return { ok: false, atSeq: e.seq, problem: 'not linked to the entry before it' };
    const { hash, ...rest } = e;
    if (entryHash(rest) !== hash) return { ok: false, atSeq: e.seq, problem: 'its content does not match its hash' };
    prev = hash;
  }
  return { ok: true };
}
