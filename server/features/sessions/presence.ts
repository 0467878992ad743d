import type { DataSource } from 'typeorm';
import type { SessionState } from '@shared/protocol/session';
import type { PresenceEntry } from '@shared/protocol/sessions-api';
import type { RailcallServer } from '../../realtime/io';
import { PresenceRow } from './session.entity';
import { sessionRoom } from './sessions.handlers';

/** How long to wait for the other server processes to say which sockets they hold. */
export const PRESENCE_ASK_MS = 1000;

type Connected = Map<number, { name: string; sockets: number }>;

/**
 * Who has a session open on a phone right now and when each was last seen, across every server
 * process. "Connected" is asked of the sockets themselves (Socket.IO's adapter answers for every
 * process; a process that died takes its sockets with it). When each person was last seen is kept
 * in `session_presence`, so a phone that reconnects to another process still shows it.
 * Joining and leaving are in the kept log; connections come and go and are not.
 */
export class Presence {
  constructor(
    private readonly db: DataSource,
    private readonly io: () => RailcallServer,
    private readonly now: () => number = Date.now,
  ) {}

  /** The people with a socket in the session's room, on any process (this one alone if the others do not answer in time). */
  async connected(sessionId: number): Promise<Connected> {
    const room = sessionRoom(sessionId);
    const sockets = await this.io().in(room).timeout(PRESENCE_ASK_MS).fetchSockets()
      .catch(() => this.io().local.in(room).fetchSockets());
    const people: Connected = new Map();
    for (const s of sockets) {
      const user = s.data.user;
      if (!user) continue;
      const seen = people.get(user.id) ?? { name: user.name, sockets: 0 };
      seen.sockets += 1;
      people.set(user.id, seen);
    }
    return people;
  }

  /** Notes that the person was here just now (on watching, leaving and dropping). */
  async seen(sessionId: number, personId: number, name: string): Promise<void> {
    await this.db.createQueryBuilder().insert().into(PresenceRow)
      .values({ sessionId, personId, personName: name, lastSeenMs: this.now() })
      .orUpdate(['person_name', 'last_seen_ms'], ['session_id', 'person_id']).execute();
  }

  /** Everyone joined (connected or not) and everyone watching, with the role they joined in. */
  async list(sessionId: number, state: SessionState, connected?: Connected): Promise<PresenceEntry[]> {
    const live = connected ?? await this.connected(sessionId);
    const rows = await this.db.getRepository(PresenceRow).findBy({ sessionId });
    const lastSeen = new Map(rows.map((r) => [r.personId, r]));
    const nowMs = this.now();
    const entries = new Map<number, PresenceEntry>();
    for (const p of state.participants) {
      const on = live.has(p.personId);
      entries.set(p.personId, { personId: p.personId, name: p.name, role: p.role, connected: on, lastSeenMs: on ? nowMs : lastSeen.get(p.personId)?.lastSeenMs ?? p.joinedAtMs });
    }
    for (const [personId, seen] of live) {
      if (!entries.has(personId)) entries.set(personId, { personId, name: seen.name, role: null, connected: true, lastSeenMs: nowMs });
    }
    for (const r of rows) {
      if (!entries.has(r.personId)) entries.set(r.personId, { personId: r.personId, name: r.personName, role: null, connected: false, lastSeenMs: r.lastSeenMs });
    }
    return [...entries.values()];
  }
}
