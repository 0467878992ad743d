/**
 * Socket.IO event maps shared by the server and the client: one contract, two sides.
 * Client requests are imperative (`session:act`); server broadcasts are past tense or nouns.
 */
import type { SessionClientToServerEvents, SessionServerToClientEvents } from './session/events';
import type { PresenceEntry } from './sessions-api';
import type { VenueSummary } from './people';

export interface ServerToClientEvents extends SessionServerToClientEvents {
  /** Sent to every socket of a sign-in just before the server disconnects them at sign-out. */
  'auth:signed-out': () => void;
  /** Sent to every socket of a sign-in when one of its tabs switched venue: reload what is shown. */
  'me:venue-changed': (payload: { venue: VenueSummary }) => void;
  /**
   * Sent to every socket of a person whose roles changed: the phone asks who it is again; `reason` is
   * what to tell them if that finds them signed out (no role at this venue any more).
   */
  'me:roles-changed': (payload: { reason: string }) => void;
  /** Who has the session open now, after someone connects or drops. */
  'session:presence': (payload: { sessionId: number; presence: PresenceEntry[] }) => void;
  /**
   * This socket was taken out of a session's room (the person's roles changed). The phone watches
   * again, which checks the new roles, and shows `reason` if that is refused.
   */
  'session:dropped': (payload: { sessionId: number; reason: string }) => void;
  /**
   * To everyone signed in at the venue (the server puts each socket in its venue's room): a session
   * opened, began, finished or ended. Home screens ask for the running sessions again (the list itself
   * comes over HTTP, checked like any request).
   */
  'venue:sessions-changed': (payload: VenueSessionsChanged) => void;
}

/** What changed in a venue's list of running sessions. */
export interface VenueSessionsChanged {
  sessionId: number;
  change: 'opened' | 'began' | 'finished' | 'ended';
}

export type ClientToServerEvents = SessionClientToServerEvents;

/** Every event a phone may send; anything else is refused before any handler (deny by default). */
export const CLIENT_EVENTS = ['session:watch', 'session:unwatch', 'session:act'] as const satisfies readonly (keyof ClientToServerEvents)[];
