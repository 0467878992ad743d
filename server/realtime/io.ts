import type { Server as HttpServer, IncomingMessage, ServerResponse } from 'node:http';
import type { RequestHandler } from 'express';
import type { PassportStatic } from 'passport';
import { Server, type ServerOptions, type Socket } from 'socket.io';
import { CLIENT_EVENTS, type ClientToServerEvents, type ServerToClientEvents } from '@shared/protocol/events';
import type { SignedInUser } from '../features/people/people.service';
import type { VenueSummary } from '@shared/protocol/people';

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
      socket.emit('auth:signed-out');
      socket.disconnect(true);
      return false;
    }
    if (fresh.venueId !== socket.data.user.venueId) {
      // Nothing of the venue left behind keeps streaming to this socket.
      const keep = ownRooms(socket);
      for (const room of socket.rooms) if (!keep.has(room)) void socket.leave(room);
    }
    socket.data.user = fresh;
  }
  return true;
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

/**
 * Socket.IO shares the Express sign-in (the documented pattern: express-session and passport
 * on the engine's handshake). A handshake without a signed-in person is refused with 401.
 */
export function createIo(httpServer: HttpServer, session: RequestHandler, passport: PassportStatic, features: SocketFeature[], signInLifetimeMs = Infinity, adapter?: ServerOptions['adapter'], loadUser?: LoadUser): RailcallServer {
  // With several server processes, `adapter` carries broadcasts and room queries between them (Redis Streams).
  const io: RailcallServer = new Server(httpServer, { serveClient: false, maxHttpBufferSize: 64 * 1024, ...(adapter ? { adapter } : {}) });
  io.engine.use(onlyForHandshake(session));
  io.engine.use(onlyForHandshake(passport.session() as RequestHandler));
  io.engine.use(onlyForHandshake(((req, res, next) => {
    if (req.user) next();
    else {
      res.writeHead(401, { 'content-type': 'application/json' });
      res.end(JSON.stringify({ error: { code: 'unauthenticated', message: 'Sign in first.' } }));
    }
  }) as RequestHandler));

  io.on('connection', (socket) => {
    const req = socket.request as EngineRequest;
    socket.data.user = req.user as SignedInUser;
    socket.data.sessionId = req.sessionID as string;
    void socket.join([sessionRoom(socket.data.sessionId), personRoom(socket.data.user.id)]);
    // Deny by default: an event no feature serves is dropped before any handler sees it.
    socket.use(([event], next) => {
      if (!(CLIENT_EVENTS as readonly string[]).includes(event)) return next(new Error(`Unknown event: ${String(event).slice(0, 40)}`));
      if (!loadUser) return next();
      followSignIn(socket, loadUser).then((open) => (open ? next() : next(new Error('Signed out'))), next);
    });
    socket.on('error', () => {});
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
