import type { Server as HttpServer, IncomingMessage, ServerResponse } from 'node:http';
import type { RequestHandler } from 'express';
import type { PassportStatic } from 'passport';
import { Server, type ServerOptions, type Socket } from 'socket.io';
import { RateLimiterMemory } from 'rate-limiter-flexible';
import { CLIENT_EVENTS, type ClientToServerEvents, type ServerToClientEvents } from '@shared/protocol/events';
import type { ApiError } from '@shared/protocol/ack';
import type { SignedInUser } from '../features/people/people.service';
import type { VenueSummary } from '@shared/protocol/people';
import { crossSiteRefusal, type OriginPolicy } from '../middleware/origin';

export interface SocketData {
  user: SignedInUser;
  /** The express-session id this socket was opened under: sign-out ends exactly these sockets. */
  sessionId: string;
}

export type RailcallServer = Server<ClientToServerEvents, ServerToClientEvents, Record<string, never>, SocketData>;
export type RailcallSocket = Socket<ClientToServerEvents, ServerToClientEvents, Record<string, never>, SocketData>;

/** A feature that serves socket events registers its handlers through one of these. */
export type SocketFeature = (io: RailcallServer, socket: RailcallSocket) => void;

type EngineRequest = IncomingMessage & {
  _query: Record<string, string>;
  user?: SignedInUser;
  sessionID?: string;
  session?: { signedInAt?: number; venueId?: number; reload(done: (error?: unknown) => void): void };
};

/** Loads a signed-in person acting on the venue they chose (PeopleService.loadUser). */
export type LoadUser = (personId: number, wantedVenueId?: number | null) => Promise<SignedInUser | null>;

const ownRooms = (socket: RailcallSocket) => new Set([socket.id, sessionRoom(socket.data.sessionId), personRoom(socket.data.user.id)]);

/**
 * Before every event: the sign-in is read again from the store, so a venue chosen in another tab (or on
 * another server) applies to this socket's next event, and an ended sign-in ends the socket.
 */
async function followSignIn(socket: RailcallSocket, loadUser: LoadUser): Promise<boolean> {
  const req = socket.request as EngineRequest;
  if (!req.session) return true;
  const session = req.session;
  const failed = await new Promise<Error | null>((resolve) => session.reload((error?: unknown) => resolve((error as Error | undefined) ?? null)));
  // The store could not be read (database restarting): not a sign-out. The event goes on as the person signed in;
  // an action then meets the same outage and is answered "unavailable", and the phone sends it again.
  if (failed && failed.message !== 'failed to load session') return true;
  const alive = !failed;
  // reload() puts a fresh session object on the request.
  const wanted = alive ? req.session.venueId : undefined;
  if (!alive || (wanted !== undefined && wanted !== socket.data.user.venueId)) {
    const fresh = alive ? await loadUser(socket.data.user.id, wanted) : null;
    if (!fresh) {
      endSocketSignIn(socket);
      return false;
    }
    if (fresh.venueId !== socket.data.user.venueId) {
      // Nothing of the venue left behind keeps streaming to this socket; the chosen venue's news does.
      const keep = ownRooms(socket);
      for (const room of socket.rooms) if (!keep.has(room)) void socket.leave(room);
      void socket.join(venueRoom(fresh.venueId));
    }
    socket.data.user = fresh;
  }
  return true;
}

/**
 * Events whose handler checks the sign-in itself, inside the work it does (an action reads the sign-in in
 * its own round trip to the database): the store is not read a second time before them.
 */
const SIGN_IN_CHECKED_BY_HANDLER: ReadonlySet<string> = new Set(['session:act']);

const signInFollowers = new WeakMap<RailcallSocket, () => Promise<boolean>>();

/**
 * For a handler that found the sign-in changed: reads it again as before any other event (a new venue
 * chosen is taken on; an ended sign-in ends the socket). False when the socket was signed out.
 */
export function catchUpSignIn(socket: RailcallSocket): Promise<boolean> {
  return signInFollowers.get(socket)?.() ?? Promise.resolve(true);
}

/** An ended sign-in found by a handler: the phone is told, and the socket closed. */
export function endSocketSignIn(socket: RailcallSocket): void {
  socket.emit('auth:signed-out');
  socket.disconnect(true);
}

/** Session middleware runs on the handshake request only, not on every polling request. */
function onlyForHandshake(middleware: RequestHandler) {
  return (req: EngineRequest, res: ServerResponse, next: (error?: unknown) => void) => {
    if (req._query.sid === undefined) middleware(req as never, res as never, next);
    else next();
  };
}

export const sessionRoom = (sessionId: string) => `sid:${sessionId}`;
export const personRoom = (personId: number) => `person:${personId}`;
/** Every socket signed in at a venue (acting on it now): venue-wide news such as sessions opening and ending. */
export const venueRoom = (venueId: number) => `venue:${venueId}`;

export interface IoOptions {
  /** A socket closes when its sign-in reaches this age. */
  signInLifetimeMs: number;
  origin: OriginPolicy;
  /** Events one socket may send per second; more are answered "slow down" (the socket stays open). */
  eventsPerSecond: number;
  /** Carries broadcasts and room queries between server processes; unset for one process. */
  adapter?: ServerOptions['adapter'];
  /** Reloads the person at each event (their chosen venue and roles as they are now). */
  loadUser: LoadUser;
}

/** The largest payload one event may carry (JSON text); a session action is a few hundred bytes. */
export const EVENT_PAYLOAD_LIMIT = 16 * 1024;

/** Answers a refused packet through its acknowledgement, when it has one (the last argument). */
function answerRefused(args: unknown[], error: ApiError): void {
  const ack = args.at(-1);
  if (typeof ack === 'function') ack({ ok: false, error });
}

/**
 * Socket.IO shares the Express sign-in (the documented pattern: express-session and passport
 * on the engine's handshake). Every engine request (polling or websocket) from a foreign origin is
 * refused with 403; a handshake without a signed-in person with 401.
 */
export function createIo(httpServer: HttpServer, session: RequestHandler, passport: PassportStatic, features: SocketFeature[], options: IoOptions): RailcallServer {
  const { signInLifetimeMs, origin, eventsPerSecond, adapter, loadUser } = options;
  // With several server processes, `adapter` carries broadcasts and room queries between them (Redis Streams).
  const io: RailcallServer = new Server(httpServer, { serveClient: false, maxHttpBufferSize: 64 * 1024, ...(adapter ? { adapter } : {}) });
  io.engine.use(((req, res, next) => {
    // Any socket request may lead to a change: judged as strictly as an HTTP POST.
    const refusal = crossSiteRefusal('POST', req.headers, origin);
    if (!refusal) return next();
    res.writeHead(403, { 'content-type': 'application/json' });
    res.end(JSON.stringify({ error: { code: 'forbidden', message: refusal } }));
  }) as RequestHandler);
  io.engine.use(onlyForHandshake(session));
  io.engine.use(onlyForHandshake(passport.session() as RequestHandler));
  io.engine.use(onlyForHandshake(((req, res, next) => {
    if (req.user) next();
    else {
      res.writeHead(401, { 'content-type': 'application/json' });
      res.end(JSON.stringify({ error: { code: 'unauthenticated', message: 'Sign in first.' } }));
    }
  }) as RequestHandler));

  const limiter = new RateLimiterMemory({ points: eventsPerSecond, duration: 1 });
  io.on('connection', (socket) => {
    const req = socket.request as EngineRequest;
    socket.data.user = req.user as SignedInUser;
    socket.data.sessionId = req.sessionID as string;
    void socket.join([sessionRoom(socket.data.sessionId), personRoom(socket.data.user.id), venueRoom(socket.data.user.venueId)]);
    // A phone that sends too fast is told to slow down; its connection stays open for the retry.
    socket.use(([, ...args], next) => {
      limiter.consume(socket.id).then(() => next(), () => {
        answerRefused(args, { code: 'too-many-requests', message: 'Slow down: this phone sent too many requests at once. Wait a moment; Railcall will take the next one.' });
      });
    });
    // Payloads past the event limit are refused with words; past maxHttpBufferSize the engine closes the connection.
    socket.use(([, ...args], next) => {
      const payload = typeof args.at(-1) === 'function' ? args.slice(0, -1) : args;
      if (JSON.stringify(payload).length <= EVENT_PAYLOAD_LIMIT) return next();
      answerRefused(args, { code: 'bad-input', message: `The request is too large (the limit is ${EVENT_PAYLOAD_LIMIT / 1024} kB).` });
    });
    // Deny by default: an event no feature serves is refused before any handler sees it.
    socket.use(([event, ...args], next) => {
      if (!(CLIENT_EVENTS as readonly string[]).includes(event)) {
        answerRefused(args, { code: 'not-found', message: `Railcall does not know the request "${String(event).slice(0, 40)}". Reload the page.` });
        return;
      }
      if (SIGN_IN_CHECKED_BY_HANDLER.has(event)) return next();
      followSignIn(socket, loadUser).then((open) => (open ? next() : next(new Error('Signed out'))), next);
    });
    signInFollowers.set(socket, () => followSignIn(socket, loadUser));
    socket.on('error', () => {});
    socket.on('disconnect', () => void limiter.delete(socket.id));
    // A socket ends with its sign-in's absolute lifetime, however active it is.
    const leftMs = signInLifetimeMs - (Date.now() - (req.session?.signedInAt ?? Date.now()));
    if (Number.isFinite(leftMs)) {
      const expiry = setTimeout(() => {
        socket.emit('auth:signed-out');
        socket.disconnect(true);
      }, Math.max(0, Math.min(leftMs, 2 ** 31 - 1)));
      expiry.unref();
      socket.on('disconnect', () => clearTimeout(expiry));
    }
    for (const feature of features) feature(io, socket);
  });
  return io;
}

/** A venue was chosen in one tab: every socket of that sign-in is told (the next event acts on it anyway). */
export function venueChosen(io: RailcallServer, sessionId: string, venue: VenueSummary): void {
  io.in(sessionRoom(sessionId)).emit('me:venue-changed', { venue });
}

/** Sign-out: tell the sockets of that sign-in, then close them. */
export function endSignIn(io: RailcallServer, sessionId: string): void {
  const room = io.in(sessionRoom(sessionId));
  room.emit('auth:signed-out');
  room.disconnectSockets(true);
}

/** Deactivation: every socket of the person, on every device, is told and closed. */
export function endPersonSignIns(io: RailcallServer, personId: number): void {
  const room = io.in(personRoom(personId));
  room.emit('auth:signed-out');
  room.disconnectSockets(true);
}
