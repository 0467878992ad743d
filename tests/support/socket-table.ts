import { randomUUID } from 'node:crypto';
import type { Socket } from 'socket.io-client';
import type { CLIENT_EVENTS } from '@shared/protocol/events';
import type { ErrorCode } from '@shared/protocol/ack';
import type { Role } from '@shared/protocol/roles';

export type ClientEvent = (typeof CLIENT_EVENTS)[number];

/** What a socket event comes to: accepted, refused with a known code, or (an event without ack) nothing. */
export type Outcome = 'ok' | ErrorCode | 'no-answer';

export interface SocketCtx {
  /** A loading session of the home venue. */
  sessionId: number;
  role: Role;
}

export interface SocketCase {
  /** The outcome for a person of the home venue, by role. */
  own: Record<Role, Outcome>;
  /** The outcome for a person of another venue in any role, naming the home venue's session. */
  otherVenue: Outcome;
  /** Sends a valid request; resolves with its outcome. */
  send(socket: Socket, ctx: SocketCtx): Promise<Outcome>;
}

const everyone = (outcome: Outcome): Record<Role, Outcome> =>
  ({ admin: outcome, rail: outcome, loader: outcome, deck: outcome, 'stage-manager': outcome });

type AnyAck = { ok: true } | { ok: false; error: { code: ErrorCode } };
const outcomeOf = (res: AnyAck): Outcome => (res.ok ? 'ok' : res.error.code);

/** Waits briefly for an ack that should not come. */
async function noAnswer(socket: Socket, event: string, payload: unknown): Promise<Outcome> {
  const answered = socket.timeout(300).emitWithAck(event, payload).then(() => 'answered' as const, () => 'no-answer' as const);
  return (await answered) === 'no-answer' ? 'no-answer' : 'ok';
}

/**
 * Every socket event a phone may send, one row each (typed by the shared event list, so a new event
 * without a row does not compile, and the socket access test checks the list too).
 */
export const SOCKET_TABLE: Record<ClientEvent, SocketCase> = {
  'session:watch': {
    own: everyone('ok'),
    otherVenue: 'not-found',
    send: async (s, c) => outcomeOf(await s.emitWithAck('session:watch', { sessionId: c.sessionId, afterSeq: 0 })),
  },
  'session:unwatch': {
    // Sent without an acknowledgement: nothing answers, and nothing changes for another venue.
    own: everyone('no-answer'),
    otherVenue: 'no-answer',
    send: (s, c) => noAnswer(s, 'session:unwatch', { sessionId: c.sessionId }),
  },
  'session:act': {
    // Joining in one's own role; the admin holds no session role, so the session refuses; the rail
    // operator opened the session and leads it already (joined at opening), so the join is already done.
    own: { ...everyone('ok'), admin: 'forbidden', rail: 'conflict' },
    otherVenue: 'not-found',
    send: async (s, c) => outcomeOf(await s.emitWithAck('session:act', {
      sessionId: c.sessionId,
      envelope: { key: randomUUID(), clientTimeMs: Date.now(), action: { type: 'join', role: c.role === 'admin' ? 'rail' : c.role } },
    })),
  },
};
