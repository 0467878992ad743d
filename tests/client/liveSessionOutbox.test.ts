import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest';
import { createPinia, setActivePinia } from 'pinia';
import type { SessionAlert } from '@shared/protocol/session';
import { useAuthStore } from '@/stores/auth';
import { useLiveSessionStore } from '@/stores/liveSession';
import { begun } from './support/session';

/** A stand-in for the app's socket: records what is sent (with its ack) and fires server events. */
const wire = vi.hoisted(() => {
  type Handler = (...args: never[]) => void;
  type Ack = (...args: unknown[]) => void;
  const handlers = new Map<string, Handler[]>();
  const sent: Array<{ event: string; payload: Record<string, unknown>; ack?: Ack }> = [];
  const record = (event: string, payload: Record<string, unknown>, ack?: Ack) => {
    sent.push({ event, payload, ack });
  };
  const socket = {
    connected: true,
    active: true,
    on(event: string, handler: Handler) {
      handlers.set(event, [...(handlers.get(event) ?? []), handler]);
      return socket;
    },
    emit: record,
    timeout: () => ({ emit: record }),
    connect() {},
    disconnect() {},
  };
  const fire = (event: string, ...args: unknown[]) => {
    for (const handler of handlers.get(event) ?? []) (handler as (...a: unknown[]) => void)(...args);
  };
  return { socket, sent, handlers, fire };
});

vi.mock('@/services/socket', () => ({ socket: wire.socket, connectSocket: () => undefined, disconnectSocket: () => undefined }));
// The HTTP catch-up never answers here: these tests are about the live connection.
vi.mock('@/services/api', () => ({
  getSession: () => new Promise(() => undefined),
  getSessionEvents: () => new Promise(() => undefined),
  getAllSessionEvents: () => new Promise(() => undefined),
  getMeOrNull: () => Promise.resolve(null),
}));

const acts = () => wire.sent.filter((s) => s.event === 'session:act');
const actTypes = () => acts().map((s) => (s.payload.envelope as { action: { type: string } }).action.type);

beforeEach(() => {
  wire.handlers.clear();
  wire.sent.length = 0;
  wire.socket.connected = true;
  setActivePinia(createPinia());
  vi.useFakeTimers();
});
afterEach(() => {
  vi.useRealTimers();
});

describe('useLiveSessionStore outbox', () => {
  it('retries an unanswered tap with the same key in the session it was made in', () => {
    const store = useLiveSessionStore();
    store.sessionId = 7;
    void store.act({ type: 'answer-clear' });
    acts()[0].ack!(new Error('operation has timed out'));
    vi.advanceTimersByTime(1000);
    expect(acts()).toHaveLength(2);
    expect(acts()[1].payload).toEqual(acts()[0].payload);
  });

  it('keeps a tap the server could not record (database out of reach) and sends it again with the same key', async () => {
    const store = useLiveSessionStore();
    store.sessionId = 7;
    const result = store.act({ type: 'answer-clear' });
    acts()[0].ack!(null, { ok: false, error: { code: 'unavailable', message: 'Railcall cannot reach its records for a moment. Nothing was done: try again.' } });
    expect(store.outbox).toHaveLength(1);
    vi.advanceTimersByTime(1000);
    expect(acts()).toHaveLength(2);
    expect(acts()[1].payload).toEqual(acts()[0].payload);
    acts()[1].ack!(null, { ok: true, seq: 9, state: begun() });
    await expect(result).resolves.toEqual({ ok: true, seq: 9 });
    expect(store.outbox).toHaveLength(0);
  });

  it('never sends a tap from a closed session into the next one opened', () => {
    const store = useLiveSessionStore();
    store.sessionId = 7;
    void store.act({ type: 'answer-clear' });
    expect(acts()[0].payload.sessionId).toBe(7);
    // No answer in time: a retry is waiting when the phone leaves session 7 for session 8.
    acts()[0].ack!(new Error('operation has timed out'));
    store.close();
    store.sessionId = 8;
    vi.advanceTimersByTime(10_000);
    expect(acts()).toHaveLength(1);
    expect(store.outbox).toHaveLength(0);
  });

  it('drops a late answer from a closed session instead of showing its state in the next one', async () => {
    const store = useLiveSessionStore();
    store.sessionId = 7;
    const result = store.act({ type: 'answer-clear' });
    store.close();
    store.sessionId = 8;
    acts()[0].ack!(null, { ok: true, seq: 5, state: begun() });
    expect(store.state).toBeNull();
    expect(store.stateSeq).toBe(0);
    await expect(result).resolves.toMatchObject({ ok: false, code: 'closed' });
  });

  it('sends a queued hold ahead of the other queued taps when the connection comes back', () => {
    const store = useLiveSessionStore();
    store.sessionId = 7;
    wire.socket.connected = false;
    void store.act({ type: 'answer-clear' });
    void store.act({ type: 'confirm-step', stepIndex: 0 });
    void store.act({ type: 'call-hold' });
    expect(acts()).toHaveLength(0);

    wire.socket.connected = true;
    wire.fire('connect');
    const watch = wire.sent.find((s) => s.event === 'session:watch')!;
    watch.ack!(null, { ok: true, state: begun(), lastSeq: 0, entries: [], presence: [] });
    expect(actTypes()).toEqual(['call-hold', 'answer-clear', 'confirm-step']);
  });
});

describe('useLiveSessionStore alerts', () => {
  const reAlert = (over: Partial<SessionAlert> = {}): SessionAlert => ({
    sessionId: 9,
    kind: 're-alert',
    lineSetId: 'ls7',
    people: [{ personId: 2, name: 'Sam Brightwater' }],
    text: 'Sam Brightwater: no "clear" yet for line set 7.',
    seq: 12,
    ...over,
  });

  function signedInAsSam() {
    const auth = useAuthStore();
    auth.me = { id: 2, name: 'Sam Brightwater' } as typeof auth.me;
    return useLiveSessionStore();
  }

  it('keeps a re-alert naming this person from a session not open here, for any screen to show', () => {
    const store = signedInAsSam();
    store.sessionId = 7;
    wire.fire('session:alert', reAlert());
    expect(store.alert).toBeNull();
    expect(store.alertElsewhere).toMatchObject({ sessionId: 9, text: reAlert().text });
  });

  it('keeps it when no session is open at all', () => {
    const store = signedInAsSam();
    wire.fire('session:alert', reAlert());
    expect(store.alertElsewhere?.sessionId).toBe(9);
  });

  it('ignores re-alerts naming someone else, and holds of other sessions', () => {
    const store = signedInAsSam();
    wire.fire('session:alert', reAlert({ people: [{ personId: 3, name: 'Alex Tamsin' }] }));
    wire.fire('session:alert', reAlert({ kind: 'hold', people: [] }));
    expect(store.alertElsewhere).toBeNull();
  });

  it('shows a re-alert of the open session on its own screen, and clears the other one when that session opens', () => {
    const store = signedInAsSam();
    store.sessionId = 7;
    wire.fire('session:alert', reAlert({ sessionId: 7 }));
    expect(store.alert?.sessionId).toBe(7);
    expect(store.alertElsewhere).toBeNull();

    wire.fire('session:alert', reAlert());
    void store.open(9).catch(() => undefined);
    expect(store.alertElsewhere).toBeNull();
  });
});
