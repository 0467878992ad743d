/**
 * What this phone keeps of Railcall in IndexedDB (idb), so the session screen opens without a
 * signal: who is signed in, the last state and log of each session opened here, and taps not yet
 * answered by the server. Kept per person; forgotten on sign-out. Every function is quiet when the
 * browser has no IndexedDB (a private window may not): the phone then simply works online only.
 */
import { openDB, type DBSchema, type IDBPDatabase } from 'idb';
import type { Me } from '@shared/protocol/people';
import type { ActionEnvelope, LogEntry, SessionState } from '@shared/protocol/session';
import type { PresenceEntry, SessionSummary } from '@shared/protocol/sessions-api';

export interface SavedSession {
  sessionId: number;
  personId: number;
  summary: SessionSummary | null;
  state: SessionState;
  stateSeq: number;
  entries: LogEntry[];
  presence: PresenceEntry[];
  savedAtMs: number;
}

export interface SavedTap {
  key: string;
  sessionId: number;
  personId: number;
  envelope: ActionEnvelope;
}

interface RailcallCache extends DBSchema {
  me: { key: 'me'; value: { me: Me; savedAtMs: number } };
  sessions: { key: [number, number]; value: SavedSession };
  outbox: { key: string; value: SavedTap; indexes: { bySession: [number, number] } };
}

let opening: Promise<IDBPDatabase<RailcallCache> | null> | null = null;

function db(): Promise<IDBPDatabase<RailcallCache> | null> {
  if (typeof indexedDB === 'undefined') return Promise.resolve(null);
  opening ??= openDB<RailcallCache>('railcall', 1, {
    upgrade(d) {
      d.createObjectStore('me');
      d.createObjectStore('sessions', { keyPath: ['personId', 'sessionId'] });
      d.createObjectStore('outbox', { keyPath: 'key' }).createIndex('bySession', ['personId', 'sessionId']);
    },
  }).catch(() => null);
  return opening;
}

async function quietly<T>(work: (d: IDBPDatabase<RailcallCache>) => Promise<T>, fallback: T): Promise<T> {
  try {
    const d = await db();
    return d ? await work(d) : fallback;
  } catch {
    return fallback;
  }
}

export const saveMe = (me: Me) => quietly((d) => d.put('me', { me, savedAtMs: Date.now() }, 'me'), undefined);
export const loadMe = () => quietly(async (d) => (await d.get('me', 'me'))?.me ?? null, null);

export const saveSession = (saved: SavedSession) => quietly((d) => d.put('sessions', saved), undefined);
export const loadSession = (personId: number, sessionId: number) =>
  quietly(async (d) => (await d.get('sessions', [personId, sessionId])) ?? null, null);

export const saveTap = (tap: SavedTap) => quietly((d) => d.put('outbox', tap), undefined);
export const dropTap = (key: string) => quietly((d) => d.delete('outbox', key), undefined);
export const loadTaps = (personId: number, sessionId: number) =>
  quietly((d) => d.getAllFromIndex('outbox', 'bySession', [personId, sessionId]), [] as SavedTap[]);

/** Sign-out: this phone forgets the person, their sessions and their unsent taps. */
export const forgetEverything = () =>
  quietly(async (d) => {
    const tx = d.transaction(['me', 'sessions', 'outbox'], 'readwrite');
    await Promise.all([tx.objectStore('me').clear(), tx.objectStore('sessions').clear(), tx.objectStore('outbox').clear(), tx.done]);
  }, undefined);
