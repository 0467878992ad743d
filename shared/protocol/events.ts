/**
 * Socket.IO event maps shared by the server and the client.
 * Placeholder written by the client shell; the server side owns and extends it.
 */
export interface ServerToClientEvents {
  /** Sent to every socket of a person just before the server disconnects them at sign-out. */
  'auth:signed-out': () => void;
}

// eslint-disable-next-line @typescript-eslint/no-empty-object-type
export interface ClientToServerEvents {}
