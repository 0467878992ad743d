import { nextReAlertAtMs, type SessionState } from '@shared/protocol/session';
import type { Logger } from '../../logger';
import type { SessionsService } from './sessions.service';

/**
 * The venue's re-alert time (default 20 s): whoever is still silent after a move call is alerted
 * again, by a system action that is decided and logged like any other.
 *
 * Several server processes may run. Every commit writes the session's next due time into its row
 * (`re_alert_due_ms`); each process sets a timer for its own commits at once and looks in the
 * database every POLL_MS for due times written by the others, so a due re-alert is found even when
 * the process that wrote it has died. Firing claims it under the session's row lock
 * (`SessionsService.reAlertIfDue`): of all the processes that try, exactly one writes it.
 */
const RETRY_MS = 2000;
export const POLL_MS = 1000;

export class ReAlertTimer {
  private readonly timers = new Map<number, { atMs: number; timer: NodeJS.Timeout }>();
  private poller: NodeJS.Timeout | null = null;
  private stopped = false;

  constructor(
    private readonly sessions: SessionsService,
    private readonly logger: Logger,
    private readonly now: () => number = Date.now,
  ) {}

  async start(): Promise<void> {
    // Sessions written before due times were kept in the row: their timers come from their state.
    for (const s of await this.sessions.openSessions()) this.track(s.id, s.venueId, s.state);
    this.poll();
  }

  /** After this process's own commit: the next due time is known exactly, no need to wait for the poll. */
  track(sessionId: number, venueId: number, state: SessionState): void {
    const atMs = nextReAlertAtMs(state);
    if (atMs === null) this.clear(sessionId);
    else this.at(sessionId, venueId, atMs);
  }

  private poll(): void {
    if (this.stopped) return;
    this.poller = setTimeout(() => {
      void this.sessions.reAlertsDueBy(this.now() + POLL_MS)
        .then((due) => { for (const d of due) this.at(d.id, d.venueId, d.dueMs); })
        .catch((error) => this.logger.warn({ err: error }, 'could not look for due re-alerts; looking again'))
        .finally(() => this.poll());
    }, POLL_MS);
    this.poller.unref();
  }

  private at(sessionId: number, venueId: number, atMs: number, force = false): void {
    if (this.stopped) return;
    const set = this.timers.get(sessionId);
    if (set && set.atMs === atMs && !force) return;
    this.clear(sessionId);
    const timer = setTimeout(() => void this.fire(sessionId, venueId), Math.max(0, atMs - this.now()));
    timer.unref();
    this.timers.set(sessionId, { atMs, timer });
  }

  private clear(sessionId: number): void {
    clearTimeout(this.timers.get(sessionId)?.timer);
    this.timers.delete(sessionId);
  }

  private async fire(sessionId: number, venueId: number): Promise<void> {
    this.timers.delete(sessionId);
    if (this.stopped) return;
    try {
      // Our own commit sets the next timer; when another process claimed it first (or the timer ran a
      // little early by the wall clock), wait for the next due time of the state as it now stands.
      const outcome = await this.sessions.reAlertIfDue(venueId, sessionId);
      if (outcome.entries.length === 0) this.track(sessionId, venueId, outcome.state);
    } catch (error) {
      if (this.stopped) return;
      this.logger.error({ err: error, sessionId }, 're-alert failed; trying again');
      this.at(sessionId, venueId, this.now() + RETRY_MS, true);
    }
  }

  stop(): void {
    this.stopped = true;
    if (this.poller) clearTimeout(this.poller);
    for (const { timer } of this.timers.values()) clearTimeout(timer);
    this.timers.clear();
  }
}
