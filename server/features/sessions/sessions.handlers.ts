import { describeEntry, sessionActPayloadSchema, sessionUnwatchPayloadSchema, type SessionActAnswer, sessionWatchPayloadSchema, type LogEntry, type SessionState, type SessionWatchResult } from '@shared/protocol/session';
import type { Ack, ApiError } from '@shared/protocol/ack';
import { HttpError, unavailableFrom } from '../../middleware/http-error';
import { catchUpSignIn, endSocketSignIn, personRoom, venueRoom, type RailcallServer, type SocketFeature } from '../../realtime/io';
import { SignInEnded, SignInMoved } from '../auth/sign-in-row';
import type { VenueSessionsChanged } from '@shared/protocol/events';
import type { Logger } from '../../logger';
import { parseInput } from '../../middleware/validate';
import type { PeopleService } from '../people/people.service';
import type { Presence } from './presence';
import type { SessionsService } from './sessions.service';

export const sessionRoom = (sessionId: number) => `loading:${sessionId}`;

/** Turns any failure into an error a phone can show; unexpected ones are logged in full here. */
function toApiError(error: unknown, logger: Logger): ApiError {
  if (error instanceof HttpError) return error.toBody().error;
  const unavailable = unavailableFrom(error);
  if (unavailable) return unavailable.toBody().error;
  logger.error({ err: error }, 'socket handler failed');
  return { code: 'internal', message: 'Something went wrong on the server. Try again.' };
}

function safeAck<T>(ack: unknown): (res: Ack<T>) => void {
  return typeof ack === 'function' ? (ack as (res: Ack<T>) => void) : () => {};
}

/** Socket events of live sessions: validate, decide (in the service's transaction), acknowledge; broadcast follows commit. */
/**
 * The session events of a socket. `drain` waits for the presence updates of sockets that just went:
 * on shutdown they must be out before the broadcast layer (Redis) closes under them.
 */
export function sessionSocketFeature(sessions: SessionsService, presence: Presence, logger: Logger): SocketFeature & { drain(): Promise<void> } {
  const leaving = new Set<Promise<void>>();
  const feature: SocketFeature = (io, socket) => {
    const user = () => socket.data.user;

    const announcePresence = async (sessionId: number) => {
      const { state } = await sessions.get(user(), sessionId);
      io.to(sessionRoom(sessionId)).emit('session:presence', { sessionId, presence: await presence.list(sessionId, state) });
    };
    /** After this socket left a session's room: if it was the person's last socket there, say they are away. */
    const left = async (sessionId: number) => {
      await presence.seen(sessionId, user().id, user().name);
      if (!(await presence.connected(sessionId)).has(user().id)) await announcePresence(sessionId);
    };

    socket.on('session:watch', async (payload, rawAck) => {
      const ack = safeAck<SessionWatchResult>(rawAck);
      try {
        const { sessionId, afterSeq } = parseInput(sessionWatchPayloadSchema, payload, 'request to open the session');
        socket.data.user = await sessions.stillAtVenue(user());
        const { state } = await sessions.get(user(), sessionId); // 404 for another venue's session
        await socket.join(sessionRoom(sessionId));
        // One page at most: a phone further behind fetches the rest over HTTP (it sees lastSeq).
        const { entries, lastSeq } = await sessions.events(user(), sessionId, afterSeq ?? 0);
        await presence.seen(sessionId, user().id, user().name);
        const connected = await presence.connected(sessionId);
        ack({ ok: true, state, lastSeq, entries, presence: await presence.list(sessionId, state, connected) });
        // The person's first socket in the room: everyone else learns they are here.
        if (connected.get(user().id)?.sockets === 1) await announcePresence(sessionId);
      } catch (error) {
        ack({ ok: false, error: toApiError(error, logger) });
      }
    });

    socket.on('session:unwatch', async (payload) => {
      const parsed = sessionUnwatchPayloadSchema.safeParse(payload);
      if (!parsed.success) return; // no acknowledgement to answer: nothing to do
      const { sessionId } = parsed.data;
      if (!socket.rooms.has(sessionRoom(sessionId))) return;
      await socket.leave(sessionRoom(sessionId));
      await left(sessionId).catch(() => {});
    });

    socket.on('session:act', async (payload, rawAck) => {
      const ack = (typeof rawAck === 'function' ? rawAck : () => {}) as (res: SessionActAnswer) => void;
      try {
        const parsed = parseInput(sessionActPayloadSchema, payload, 'action');
        const act = () => sessions.act(user(), parsed.sessionId, parsed.envelope, socket.data.sessionId);
        // The sign-in is read inside the action's own round trip; a venue chosen in another tab since
        // this socket last looked is taken on, and the action tried once more as that venue.
        const { answer } = await act().catch(async (error: unknown) => {
          if (!(error instanceof SignInMoved)) throw error;
          if (!(await catchUpSignIn(socket))) throw new SignInEnded();
          return act();
        });
        // A refusal is logged too: its seq lets the phone point at its own entry.
        ack(answer);
      } catch (error) {
        ack({ ok: false, error: toApiError(error, logger) });
        if (error instanceof SignInEnded) endSocketSignIn(socket);
      }
    });

    // The rooms are gone by 'disconnect': note which sessions this socket had open while they are still there.
    let watched: number[] = [];
    socket.on('disconnecting', () => {
      watched = [...socket.rooms].filter((r) => r.startsWith('loading:')).map((r) => Number(r.slice('loading:'.length)));
    });
    socket.on('disconnect', () => {
      for (const sessionId of watched) {
        const update = left(sessionId).catch(() => {});
        leaving.add(update);
        void update.finally(() => leaving.delete(update));
      }
    });
  };
  return Object.assign(feature, { drain: async () => { await Promise.all([...leaving]); } });
}

/** The log entries that change a venue's list of running sessions (its phase words: gathering, loading). */
const LIST_CHANGES: Record<string, VenueSessionsChanged['change']> = { 'session-opened': 'opened', began: 'began', finished: 'finished', ended: 'ended' };

/** After every commit: the new entries and state to the room, and alerts to whoever must look up. */
export function broadcastCommitted(io: RailcallServer, c: { sessionId: number; venueId: number; entries: LogEntry[]; state: SessionState }): void {
  // Every home screen at the venue refreshes its list at once (only ids go out; the list is fetched over HTTP).
  const change = c.entries.map((e) => LIST_CHANGES[e.kind]).filter(Boolean).at(-1);
  if (change) io.to(venueRoom(c.venueId)).emit('venue:sessions-changed', { sessionId: c.sessionId, change });
  io.to(sessionRoom(c.sessionId)).emit('session:entries', { sessionId: c.sessionId, entries: c.entries, state: c.state });
  for (const entry of c.entries) {
    const text = describeEntry(entry, c.state);
    if (entry.kind === 're-alerted') {
      const people = (entry.details.people as Array<{ personId: number; name: string }>) ?? [];
      const alert = { sessionId: c.sessionId, kind: 're-alert' as const, lineSetId: entry.lineSetId, people, text, seq: entry.seq };
      for (const p of people) io.to(personRoom(p.personId)).emit('session:alert', alert);
    } else if (entry.kind === 'hold-called' || entry.kind === 'hold-released') {
      const people = c.state.participants.map((p) => ({ personId: p.personId, name: p.name }));
      io.to(sessionRoom(c.sessionId)).emit('session:alert', {
        sessionId: c.sessionId, kind: entry.kind === 'hold-called' ? 'hold' : 'hold-released', lineSetId: entry.lineSetId, people, text, seq: entry.seq,
      });
    }
  }
}

/**
 * Every phone connected to this process is sent its session's latest entry and state, as if just
 * broadcast: a phone that holds less sees the gap and fetches what it missed (after Redis was away,
 * broadcasts from other processes may not have reached it).
 */
export async function resyncLocalPhones(io: RailcallServer, sessions: SessionsService): Promise<void> {
  for (const room of io.of('/').adapter.rooms.keys()) {
    if (!room.startsWith('loading:')) continue;
    const sessionId = Number(room.slice('loading:'.length));
    const latest = await sessions.latest(sessionId);
    if (latest) io.local.to(room).emit('session:entries', { sessionId, entries: [latest.entry], state: latest.state });
  }
}

/**
 * After a person's roles change, their open sockets leave every session room and are told why;
 * each phone then watches again, which checks the new roles (and shows the refusal if there is one).
 */
export async function stopWatching(io: RailcallServer, personId: number, people: Pick<PeopleService, 'loadUser'>): Promise<void> {
  const now = await people.loadUser(personId);
  const reason = now
    ? 'Your roles at this venue changed. Railcall opens the session again with your new roles.'
    : 'You no longer hold a role at this venue, so this phone cannot follow the session any more.';
  const sockets = await io.in(personRoom(personId)).fetchSockets();
  io.in(personRoom(personId)).emit('me:roles-changed', {
    reason: now ? 'Your roles changed.' : 'You were signed out: you hold no role at this venue any more. Ask your technical director to give you one.',
  });
  const stillAt = new Map<number, boolean>();
  for (const s of sockets) {
    for (const room of s.rooms) {
      if (room.startsWith('venue:')) {
        // A venue where the person holds no role any more sends them no more news.
        const venueId = Number(room.slice('venue:'.length));
        if (!stillAt.has(venueId)) stillAt.set(venueId, (await people.loadUser(personId, venueId))?.venueId === venueId);
        if (!stillAt.get(venueId)) s.leave(room);
        continue;
      }
      if (!room.startsWith('loading:')) continue;
      s.leave(room);
      s.emit('session:dropped', { sessionId: Number(room.slice('loading:'.length)), reason });
    }
  }
}
