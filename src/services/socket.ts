import { io, type Socket } from 'socket.io-client';
import type { ClientToServerEvents, ServerToClientEvents } from '@shared/protocol/events';

export type RailcallSocket = Socket<ServerToClientEvents, ClientToServerEvents>;

/**
 * The one socket of the app, same origin; the session cookie authenticates it.
 * It stays closed until sign-in (`autoConnect: false`); stores bind its events once.
 * https://socket.io/docs/v4/client-options/#autoconnect
 */
export const socket: RailcallSocket = io({
  path: '/socket.io',
  autoConnect: false,
  withCredentials: true,
});

export function connectSocket(): void {
  // `active` is true while connected or retrying, so a second call does not open a second connection.
  if (!socket.active) socket.connect();
}

export function disconnectSocket(): void {
  socket.disconnect();
}
