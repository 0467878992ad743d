/**
 * The Socket.IO contract for live loading sessions: one typed map shared by the server and the phones.
 * Phones request imperatively (`session:watch`, `session:act`); the server broadcasts after commit.
 */
import type { Ack, ApiError } from '../ack';
import type { SessionRole } from '../roles';
import type { Decision } from './machine';
import type { ActionEnvelope, SessionWatchPayload } from './schema';
import type { SessionState } from './state';
import type { PresenceEntry } from '../sessions-api';

/** One row of a session's log, as the server stores and sends it. */
export interface LogEntry {
  /** 1, 2, 3… per session, without gaps; phones catch up from the last one they hold. */
  seq: number;
  serverTimeMs: number;
  /** The phone's clock from the envelope; null for Railcall's own entries. */
  clientTimeMs: number | null;
  /** null for Railcall's own entries (re-alerts, "finished"). */
  personId: number | null;
  personName: string;
  /** The session role the person acted in; 'system' for Railcall; null when not joined. */
  role: SessionRole | 'system' | null;
  kind: string;
  lineSetId: string | null;
  stepIndex: number | null;
  details: Record<string, unknown>;
  /** Hash of this entry (canonical text from `entryHashText`) chained to `prevHash`. */
  hash: string;
  /** The hash of entry seq − 1 (for the first entry, the session's genesis hash from its export). */
  prevHash: string;
}

/** Sent to the people who must answer or look: a re-alert of silent people, or a hold. */
export interface SessionAlert {
  sessionId: number;
  kind: 're-alert' | 'hold' | 'hold-released';
  lineSetId: string | null;
  /** Who is alerted (a hold alerts every participant). */
  people: Array<{ personId: number; name: string }>;
  /** One sentence for the alert itself. */
  text: string;
  seq: number;
}

export interface SessionWatchResult {
  state: SessionState;
  lastSeq: number;
  /** Entries after the `afterSeq` the phone gave (all of them when it gave none). */
  entries: LogEntry[];
  /** Who has the session open now, and who is joined. */
  presence: PresenceEntry[];
}

/**
 * The answer to `session:act`. `seq` is the last entry written for the action; a refusal is logged
 * too, so it carries the seq of its own entry. Input that never reached the rules (bad input, no such
 * session) was not logged and has no seq.
 */
export type SessionActAnswer =
  | { ok: true; seq: number; state: SessionState }
  | { ok: false; error: ApiError; seq?: number };

export interface SessionClientToServerEvents {
  /** Subscribe to a session's room; answered with the state and the entries the phone lacks. */
  'session:watch': (payload: SessionWatchPayload, ack: (res: Ack<SessionWatchResult>) => void) => void;
  'session:unwatch': (payload: { sessionId: number }) => void;
  /** Propose one action (a repeated key gets the first answer). */
  'session:act': (
    payload: { sessionId: number; envelope: ActionEnvelope },
    ack: (res: SessionActAnswer) => void,
  ) => void;
}

export interface SessionServerToClientEvents {
  /** New log entries and the state after them, sent after the transaction commits. */
  'session:entries': (payload: { sessionId: number; entries: LogEntry[]; state: SessionState }) => void;
  'session:alert': (payload: SessionAlert) => void;
}

/**
 * The acknowledgement error for a refused decision. Ack error codes have no 'already-done': it goes
 * out as 'conflict' (someone else did it first), with the reason as the message.
 */
export function refusalToApiError(decision: Extract<Decision, { ok: false }>): ApiError {
  const code = decision.code === 'already-done' ? 'conflict' : decision.code;
  return { code, message: decision.reason };
}

/** JSON with object keys sorted at every depth (undefined values left out): the same value, the same text. */
export function canonicalJson(value: unknown): string {
  const sort = (v: unknown): unknown => {
    if (Array.isArray(v)) return v.map(sort);
    if (v && typeof v === 'object') {
      return Object.fromEntries(
        Object.keys(v as object)
          .filter((k) => (v as Record<string, unknown>)[k] !== undefined)
          .sort()
          .map((k) => [k, sort((v as Record<string, unknown>)[k])]),
      );
    }
    return v;
  };
  return JSON.stringify(sort(value));
}

/**
 * The exact text the server hashes for an entry (sha-256 of this, hex, is `hash`): every field but
 * `hash`, keys sorted at every depth, so phones can check the chain with the same function.
 */
export function entryHashText(entry: Omit<LogEntry, 'hash'>): string {
  const { hash: _drop, ...rest } = entry as LogEntry;
  return canonicalJson(rest);
}
