import { defineStore } from 'pinia';
import { computed, ref, shallowRef, toRaw } from 'vue';
import type { Ack } from '@shared/protocol/ack';
import type { PresenceEntry, SessionSummary } from '@shared/protocol/sessions-api';
import {
  participantOf,
  type ActionEnvelope,
  type LogEntry,
  type SessionAction,
  type SessionActAnswer,
  type SessionAlert,
  type SessionState,
  type SessionWatchResult,
} from '@shared/protocol/session';
import * as api from '@/services/api';
import { ApiFailure, failureMessage } from '@/services/http';
import { dropTap, loadSession, loadTaps, saveSession, saveTap } from '@/services/offlineCache';
import { socket } from '@/services/socket';
import { makeActionKey } from '@/utils/actionKey';
import { formatMass } from '@shared/rigging';
import { useAuthStore } from './auth';
import { useNoticesStore } from './notices';

/** The tag of this session's refusal notices: a tap taken afterwards clears them. */
const REFUSAL_TAG = 'session-refusal';

/** What a person is told once the server has taken a record they made (others show on the screen). */
export function acceptedWords(action: SessionAction, units: 'metric' | 'imperial' = 'metric'): string | null {
  if (action.type === 'record-test') {
    if (action.result === 'balanced') return 'Test recorded: balanced.';
    const by = action.estimateKg !== undefined ? ` by ${formatMass(action.estimateKg, units)}` : '';
    return `Test recorded: ${action.result}${by}${action.tiedOff ? ', tied off' : ''}.`;
  }
  if (action.type === 'note') return 'Note added to the log.';
  if (action.type === 'end') return 'Session ended; the reason is in the log.';
  return null;
}

/** The app's one socket, typed by the shared event maps (shared/protocol/events.ts). */
const live = socket;

/** How long a phone waits for the server's answer to one tap before trying again with the same key. */
const ACK_TIMEOUT_MS = 8000;

/** How long a phone waits before sending an unanswered tap again. */
const RETRY_MS = 1000;

/**
 * A tap kept on the phone across a reload is sent when the signal is back, but not once it is this
 * old: a "clear" given ten minutes ago says nothing about where the person stands now.
 */
export const SAVED_TAP_MAX_AGE_MS = 10 * 60_000;

/** One tap on its way to the server. The key is made once, at the tap, and kept for every retry. */
export interface PendingAction {
  /** The session the tap was made in: it goes there or nowhere. */
  sessionId: number;
  envelope: ActionEnvelope;
  /** True while a send is waiting for its answer. */
  inFlight: boolean;
}

/** A refusal carries `seq` when the server logged it (the phone can point at its own entry). */
export type ActResult = { ok: true; seq: number } | { ok: false; code: string; message: string; seq?: number };

/** Merges log entries by sequence number: duplicates dropped, order kept. Pure, for tests too. */
export function mergeEntries(have: readonly LogEntry[], incoming: readonly LogEntry[]): LogEntry[] {
  const bySeq = new Map<number, LogEntry>();
  for (const entry of have) bySeq.set(entry.seq, entry);
  for (const entry of incoming) if (!bySeq.has(entry.seq)) bySeq.set(entry.seq, entry);
  return [...bySeq.values()].sort((a, b) => a.seq - b.seq);
}

/** The last sequence number held without a gap from 1 (the number to catch up from). */
export function contiguousSeq(entries: readonly LogEntry[]): number {
  let seq = 0;
  for (const entry of entries) {
    if (entry.seq === seq + 1) seq = entry.seq;
    else if (entry.seq > seq + 1) break;
  }
  return seq;
}

/**
 * The live loading session open on this phone: its state, its log by sequence number, who is
 * connected, and the outbox of taps not yet answered. Socket events are bound once, here; on every
 * (re)connect the store watches again from the last sequence number it holds and retries the outbox.
 */
export const useLiveSessionStore = defineStore('liveSession', () => {
  const auth = useAuthStore();
  const notices = useNoticesStore();

  const sessionId = ref<number | null>(null);
  const summary = ref<SessionSummary | null>(null);
  // Shallow: a state is replaced whole, never changed in place, and the shared rules
  // structuredClone it (which a deep reactive proxy cannot pass).
  const state = shallowRef<SessionState | null>(null);
  /** The sequence number `state` is the state after (a stale answer never replaces a newer state). */
  const stateSeq = ref(0);
  const entries = shallowRef<LogEntry[]>([]);
  const presence = shallowRef<PresenceEntry[]>([]);
  const loading = ref(false);
  const loadError = ref<string | null>(null);
  /** True once the server has this phone in the session's room. */
  const watching = ref(false);
  const outbox = ref<PendingAction[]>([]);
  /** The last alert addressed to this person (a re-alert or a hold), with when it arrived. */
  const alert = ref<(SessionAlert & { receivedAtMs: number }) | null>(null);
  /** A re-alert naming this person from a session that is not the one open here (shown on any screen). */
  const alertElsewhere = ref<(SessionAlert & { receivedAtMs: number }) | null>(null);
  /** The last refusal, in the server's words (also shown as a notice). */
  const lastRefusal = ref<string | null>(null);
  /** Set while the screen shows this phone's own copy of the session (no signal): when it was saved. */
  const cachedAtMs = ref<number | null>(null);

  const lastSeq = computed(() => contiguousSeq(entries.value));
  const myId = computed(() => auth.me?.id ?? 0);
  const me = computed(() => (state.value ? (participantOf(state.value, myId.value) ?? null) : null));

  const settle = new Map<string, (result: ActResult) => void>();
  /** Retries waiting to go; cleared when the session closes, so none reaches the next one. */
  const retries = new Set<ReturnType<typeof setTimeout>>();

  function later(run: () => void): void {
    const timer = setTimeout(() => {
      retries.delete(timer);
      run();
    }, RETRY_MS);
    retries.add(timer);
  }

  let saveTimer: ReturnType<typeof setTimeout> | null = null;
  /** Keeps this phone's copy of the session, a moment after the last change (for opening without a signal). */
  function saveSoon(): void {
    if (saveTimer) clearTimeout(saveTimer);
    saveTimer = setTimeout(() => {
      saveTimer = null;
      const id = sessionId.value;
      if (id === null || !state.value || cachedAtMs.value !== null) return;
      void saveSession({
        sessionId: id,
        personId: myId.value,
        summary: structuredClone(toRaw(summary.value)),
        state: structuredClone(toRaw(state.value)),
        stateSeq: stateSeq.value,
        entries: structuredClone(toRaw(entries.value)),
        presence: structuredClone(toRaw(presence.value)),
        savedAtMs: Date.now(),
      });
    }, 300);
  }

  function takeState(next: SessionState, seq: number): void {
    if (seq >= stateSeq.value) {
      state.value = next;
      stateSeq.value = seq;
      saveSoon();
    }
  }

  function take(incoming: readonly LogEntry[]): void {
    if (incoming.length) {
      entries.value = mergeEntries(entries.value, incoming);
      saveSoon();
    }
  }

  function reset(): void {
    sessionId.value = null;
    summary.value = null;
    state.value = null;
    stateSeq.value = 0;
    entries.value = [];
    presence.value = [];
    watching.value = false;
    alert.value = null;
    lastRefusal.value = null;
    notices.clearTag(REFUSAL_TAG);
    loadError.value = null;
    cachedAtMs.value = null;
    for (const pending of outbox.value) settle.get(pending.envelope.key)?.({ ok: false, code: 'closed', message: 'The session was closed on this phone.' });
    outbox.value = [];
    settle.clear();
    for (const timer of retries) clearTimeout(timer);
    retries.clear();
  }

  /** Fetches what the live connection missed, over plain HTTP (state, presence and every later entry). */
  async function refresh(): Promise<void> {
    const id = sessionId.value;
    if (id === null) return;
    const from = lastSeq.value;
    const [snapshot, events] = await Promise.all([api.getSession(id), api.getAllSessionEvents(id, from)]);
    if (sessionId.value !== id) return;
    cachedAtMs.value = null;
    summary.value = snapshot.session;
    presence.value = snapshot.presence;
    take(events.entries);
    takeState(snapshot.state, snapshot.lastSeq);
  }

  function watch(): void {
    const id = sessionId.value;
    if (id === null || !live.connected) return;
    live.timeout(ACK_TIMEOUT_MS).emit('session:watch', { sessionId: id, afterSeq: lastSeq.value }, (error: Error | null, res: Ack<SessionWatchResult>) => {
      if (sessionId.value !== id) return;
      if (error || !res) {
        // No answer in time: try again while still connected.
        if (live.connected) later(watch);
        return;
      }
      if (!res.ok) {
        loadError.value = res.error.message;
        return;
      }
      watching.value = true;
      cachedAtMs.value = null;
      take(res.entries);
      takeState(res.state, res.lastSeq);
      if (res.presence) presence.value = res.presence;
      // A gap (entries the answer did not carry) is filled over HTTP.
      if (lastSeq.value < res.lastSeq) void refresh().catch(() => undefined);
      flush();
    });
  }

  /** Opens a session on this phone: one snapshot over HTTP, then the live room. */
  async function open(id: number): Promise<void> {
    if (sessionId.value !== id) {
      if (sessionId.value !== null) close();
      sessionId.value = id;
    }
    if (alertElsewhere.value?.sessionId === id) alertElsewhere.value = null;
    loading.value = true;
    loadError.value = null;
    try {
      const snapshot = await api.getSession(id);
      if (sessionId.value !== id) return;
      summary.value = snapshot.session;
      presence.value = snapshot.presence;
      const events = await api.getAllSessionEvents(id, lastSeq.value);
      cachedAtMs.value = null;
      take(events.entries);
      takeState(snapshot.state, Math.max(snapshot.lastSeq, 0));
      await requeueSavedTaps(id);
      watch();
    } catch (error) {
      // No signal: show the session as this phone last saw it, marked with its age.
      if (error instanceof ApiFailure && error.code === 'network' && (await openFromCache(id))) return;
      loadError.value = failureMessage(error);
      throw error;
    } finally {
      loading.value = false;
    }
  }

  async function openFromCache(id: number): Promise<boolean> {
    const saved = await loadSession(myId.value, id);
    if (!saved || sessionId.value !== id) return false;
    summary.value = saved.summary;
    presence.value = saved.presence;
    entries.value = saved.entries;
    state.value = saved.state;
    stateSeq.value = saved.stateSeq;
    cachedAtMs.value = saved.savedAtMs;
    loadError.value = null;
    await requeueSavedTaps(id);
    return true;
  }

  /** Taps saved on this phone before a reload go out again with their own keys: the server answers each once. */
  async function requeueSavedTaps(id: number): Promise<void> {
    const saved = await loadTaps(myId.value, id);
    let stale = 0;
    for (const tap of saved) {
      if (sessionId.value !== id || outbox.value.some((p) => p.envelope.key === tap.key)) continue;
      if (Date.now() - tap.envelope.clientTimeMs > SAVED_TAP_MAX_AGE_MS) {
        stale += 1;
        void dropTap(tap.key);
        continue;
      }
      const pending: PendingAction = { sessionId: id, envelope: tap.envelope, inFlight: false };
      outbox.value = [...outbox.value, pending];
      send(outbox.value[outbox.value.length - 1]);
    }
    if (stale) {
      notices.push('warning', `${stale} ${stale === 1 ? 'tap' : 'taps'} saved on this phone more than 10 minutes ago ${stale === 1 ? 'was' : 'were'} not sent: tap again if still needed.`);
    }
  }

  function close(): void {
    if (sessionId.value !== null && live.connected) live.emit('session:unwatch', { sessionId: sessionId.value });
    reset();
  }

  function refused(message: string): void {
    lastRefusal.value = message;
    notices.push('negative', message, { tag: REFUSAL_TAG });
  }

  /** A tap the server took: an old refusal no longer stands, and a record says it was kept. */
  function accepted(action: SessionAction): void {
    lastRefusal.value = null;
    notices.clearTag(REFUSAL_TAG);
    const words = acceptedWords(action, auth.me?.venue.units ?? 'metric');
    if (words) notices.push('positive', words);
  }

  /** True while the tap still waits in the outbox of the session it was made in. */
  function stillQueued(pending: PendingAction): boolean {
    return pending.sessionId === sessionId.value && outbox.value.some((p) => p.envelope.key === pending.envelope.key);
  }

  function send(pending: PendingAction): void {
    if (!stillQueued(pending) || pending.inFlight || !live.connected) return;
    pending.inFlight = true;
    live.timeout(ACK_TIMEOUT_MS).emit('session:act', { sessionId: pending.sessionId, envelope: pending.envelope }, (error: Error | null, res: SessionActAnswer) => {
      pending.inFlight = false;
      // The session was closed (or another opened) while this tap was out: its answer belongs to no screen here.
      if (!stillQueued(pending)) return;
      // No answer, or the server could not reach its records (nothing was done): keep it queued;
      // the same key goes again (now, or after the reconnect), so it counts once however often it is sent.
      if (error || !res || (!res.ok && res.error.code === 'unavailable')) {
        if (live.connected) later(() => send(pending));
        return;
      }
      outbox.value = outbox.value.filter((p) => p !== pending);
      void dropTap(pending.envelope.key);
      const done = settle.get(pending.envelope.key);
      settle.delete(pending.envelope.key);
      if (res.ok) {
        takeState(res.state, res.seq);
        accepted(pending.envelope.action);
        done?.({ ok: true, seq: res.seq });
        return;
      }
      refused(res.error.message);
      done?.({ ok: false, code: res.error.code, message: res.error.message, ...(res.seq === undefined ? {} : { seq: res.seq }) });
      // A refusal often means this screen was behind: bring it up to date.
      void refresh().catch(() => undefined);
    });
  }

  /** Sends every queued tap, a queued hold ahead of the rest. */
  function flush(): void {
    const holdsFirst = [...outbox.value].sort(
      (a, b) => Number(b.envelope.action.type === 'call-hold') - Number(a.envelope.action.type === 'call-hold'),
    );
    for (const pending of holdsFirst) send(pending);
  }

  /**
   * Proposes one action; the server decides. Resolves when the server has answered (after any
   * reconnect), with a refusal's reason in plain words. The tap is queued while the phone is offline.
   */
  function act(action: SessionAction): Promise<ActResult> {
    const id = sessionId.value;
    if (id === null) return Promise.resolve({ ok: false, code: 'closed', message: 'No session is open on this phone.' });
    const envelope: ActionEnvelope = { key: makeActionKey(), clientTimeMs: Date.now(), action };
    const pending: PendingAction = { sessionId: id, envelope, inFlight: false };
    outbox.value = [...outbox.value, pending];
    // Kept on the phone until answered, so a reload without a signal does not lose it.
    void saveTap({ key: envelope.key, sessionId: id, personId: myId.value, envelope: structuredClone(envelope) });
    const result = new Promise<ActResult>((resolve) => settle.set(envelope.key, resolve));
    // Send the reactive copy, so `inFlight` shows on screen.
    send(outbox.value[outbox.value.length - 1]);
    return result;
  }

  function dismissAlert(): void {
    alert.value = null;
  }

  function dismissAlertElsewhere(): void {
    alertElsewhere.value = null;
  }

  live.on('connect', () => {
    watching.value = false;
    watch();
  });
  live.on('disconnect', () => {
    watching.value = false;
    for (const pending of outbox.value) pending.inFlight = false;
  });
  live.on('session:entries', (payload) => {
    if (payload.sessionId !== sessionId.value) return;
    take(payload.entries);
    const top = payload.entries.reduce((max, e) => Math.max(max, e.seq), 0);
    if (lastSeq.value >= top) takeState(payload.state, top);
    // Something was missed between the last entry held and these: fetch it.
    else void refresh().catch(() => undefined);
  });
  // The server took this phone out of the room (the person's roles changed): watch again, which
  // checks the new roles; a refusal lands in loadError and is shown instead of the session.
  live.on('session:dropped', (payload) => {
    if (payload.sessionId !== sessionId.value) return;
    watching.value = false;
    notices.push('warning', payload.reason);
    watch();
  });
  live.on('session:presence', (payload) => {
    if (payload.sessionId === sessionId.value) presence.value = payload.presence;
  });
  live.on('session:alert', (payload) => {
    const forMe = payload.people.some((p) => p.personId === myId.value);
    if (payload.sessionId === sessionId.value) {
      if (payload.kind === 'hold' || forMe) alert.value = { ...payload, receivedAtMs: Date.now() };
      return;
    }
    // Someone is waiting on this person's "clear" in a session not open here: say so on any screen.
    if (payload.kind === 're-alert' && forMe) alertElsewhere.value = { ...payload, receivedAtMs: Date.now() };
  });

  return {
    sessionId,
    summary,
    state,
    stateSeq,
    entries,
    presence,
    loading,
    loadError,
    watching,
    outbox,
    alert,
    alertElsewhere,
    lastRefusal,
    cachedAtMs,
    lastSeq,
    myId,
    me,
    open,
    close,
    refresh,
    act,
    dismissAlert,
    dismissAlertElsewhere,
  };
});
