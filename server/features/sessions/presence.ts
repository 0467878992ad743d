import type { SessionState } from '@shared/protocol/session';
import type { PresenceEntry } from '@shared/protocol/sessions-api';

interface Seen {
  name: string;
  sockets: Set<string>;
  lastSeenMs: number;
}

/**
 * Who has a session open on a phone right now (live, in memory) and when each was last seen.
 * Joining and leaving are in the kept log; connections come and go and are not.
 */
export class PresenceTracker {
  private readonly bySession = new Map<number, Map<number, Seen>>();

  constructor(private readonly now: () => number = Date.now) {}

  /** Returns true when the person was not connected to this session before. */
  connect(sessionId: number, personId: number, name: string, socketId: string): boolean {
    const people = this.bySession.get(sessionId) ?? new Map<number, Seen>();
    this.bySession.set(sessionId, people);
    const seen = people.get(personId) ?? { name, sockets: new Set<string>(), lastSeenMs: 0 };
    const wasAway = seen.sockets.size === 0;
    seen.sockets.add(socketId);
    seen.lastSeenMs = this.now();
    people.set(personId, seen);
    return wasAway;
  }

  /** Returns the sessions where this socket's person is now away. */
  disconnect(socketId: string, onlySessionId?: number): number[] {
    const changed: number[] = [];
    for (const [sessionId, people] of this.bySession) {
      if (onlySessionId !== undefined && sessionId !== onlySessionId) continue;
      for (const seen of people.values()) {
        if (seen.sockets.delete(socketId)) {
          seen.lastSeenMs = this.now();
          if (seen.sockets.size === 0) changed.push(sessionId);
        }
      }
    }
    return changed;
  }

  touch(sessionId: number, personId: number): void {
    const seen = this.bySession.get(sessionId)?.get(personId);
    if (seen) seen.lastSeenMs = this.now();
  }

  /** Everyone joined (connected or not) and everyone watching, with the role they joined in. */
  list(sessionId: number, state: SessionState): PresenceEntry[] {
    const people = this.bySession.get(sessionId) ?? new Map<number, Seen>();
    const entries = new Map<number, PresenceEntry>();
    for (const p of state.participants) {
      const seen = people.get(p.personId);
      entries.set(p.personId, { personId: p.personId, name: p.name, role: p.role, connected: !!seen?.sockets.size, lastSeenMs: seen?.lastSeenMs ?? p.joinedAtMs });
    }
    for (const [personId, seen] of people) {
      if (!entries.has(personId)) entries.set(personId, { personId, name: seen.name, role: null, connected: seen.sockets.size > 0, lastSeenMs: seen.lastSeenMs });
    }
    return [...entries.values()];
  }
}
