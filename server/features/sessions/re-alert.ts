import { nextReAlertAtMs, silentSince, type SessionState } from '@shared/protocol/session';
import type { Logger } from '../../logger';
import type { SessionsService } from './sessions.service';

/**
 * The venue's re-alert time (default 20 s): whoever is still silent after a move call is alerted
 * again, by a system action that is decided and logged like any other. One timer per open session,
 * set again after every commit, and rebuilt from the database when the server starts.
 */
const RETRY_MS = 2000;

export class ReAlertTimer {
  private readonly timers = new Map<number, NodeJS.Timeout>();
  private stopped = false;

  constructor(
    private readonly sessions: SessionsService,
    private readonly logger: Logger,
    private readonly now: () => number = Date.now,
  ) {}

  async start(): Promise<void> {
    for (const s of await this.sessions.openSessions()) this.track(s.id, s.venueId, s.state);
  }

  track(sessionId: number, venueId: number, state: SessionState): void {
    clearTimeout(this.timers.get(sessionId));
    this.timers.delete(sessionId);
    const atMs = nextReAlertAtMs(state);
    if (this.stopped || atMs === null) return;
    const timer = setTimeout(() => void this.fire(sessionId, venueId, state), Math.max(0, atMs - this.now()));
    timer.unref();
    this.timers.set(sessionId, timer);
  }

  private async fire(sessionId: number, venueId: number, state: SessionState): Promise<void> {
    this.timers.delete(sessionId);
    if (this.stopped) return;
    const due = silentSince(state, this.now()).filter((p) => p.due).map((p) => p.personId);
    // A timer can fire a little early by the wall clock: wait again rather than lose the re-alert.
    if (due.length === 0) return this.track(sessionId, venueId, state);
    try {
      // The commit listener sets the next timer from the new state.
      await this.sessions.actAsSystem(venueId, sessionId, { type: 're-alert', personIds: due });
    } catch (error) {
      if (this.stopped) return;
      this.logger.error({ err: error, sessionId }, 're-alert failed; trying again');
      const retry = setTimeout(() => void this.fire(sessionId, venueId, state), RETRY_MS);
      retry.unref();
      this.timers.set(sessionId, retry);
    }
  }

  stop(): void {
    this.stopped = true;
    for (const timer of this.timers.values()) clearTimeout(timer);
    this.timers.clear();
  }
}
