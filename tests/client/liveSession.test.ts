import { beforeEach, describe, expect, it } from 'vitest';
import { createPinia, setActivePinia } from 'pinia';
import type { LogEntry } from '@shared/protocol/session';
import { contiguousSeq, mergeEntries, useLiveSessionStore } from '@/stores/liveSession';
import { makeActionKey } from '@/utils/actionKey';
import { actionEnvelopeSchema } from '@shared/protocol/session';

const entry = (seq: number, kind = 'note'): LogEntry => ({
  seq,
  serverTimeMs: 1000 * seq,
  clientTimeMs: null,
  personId: 1,
  personName: 'Jo Castellan',
  role: 'rail',
  kind,
  lineSetId: null,
  stepIndex: null,
  details: {},
  hash: `h${seq}`,
  prevHash: seq > 1 ? `h${seq - 1}` : '',
});

describe('mergeEntries', () => {
  it('merges by sequence number, in order, dropping duplicates', () => {
    const merged = mergeEntries([entry(1), entry(2), entry(3)], [entry(3, 'dup'), entry(4), entry(2, 'dup')]);
    expect(merged.map((e) => e.seq)).toEqual([1, 2, 3, 4]);
    expect(merged.every((e) => e.kind === 'note')).toBe(true);
  });

  it('sorts entries that arrive out of order', () => {
    expect(mergeEntries([entry(2)], [entry(1), entry(3)]).map((e) => e.seq)).toEqual([1, 2, 3]);
  });
});

describe('contiguousSeq', () => {
  it('is the last number held without a gap from 1, the point to catch up from', () => {
    expect(contiguousSeq([])).toBe(0);
    expect(contiguousSeq([entry(1), entry(2), entry(3)])).toBe(3);
    expect(contiguousSeq([entry(1), entry(2), entry(5)])).toBe(2);
  });
});

describe('makeActionKey', () => {
  it('makes keys the server accepts, different for every tap', () => {
    const a = makeActionKey();
    const b = makeActionKey();
    expect(a).not.toBe(b);
    expect(actionEnvelopeSchema.safeParse({ key: a, clientTimeMs: Date.now(), action: { type: 'leave' } }).success).toBe(true);
  });
});

describe('useLiveSessionStore', () => {
  beforeEach(() => setActivePinia(createPinia()));

  it('queues a tap while offline, keeping its key for the retry', () => {
    const store = useLiveSessionStore();
    store.sessionId = 7;
    void store.act({ type: 'answer-clear' });
    expect(store.outbox).toHaveLength(1);
    const key = store.outbox[0].envelope.key;
    expect(store.outbox[0].envelope.action).toEqual({ type: 'answer-clear' });
    expect(store.outbox[0].inFlight).toBe(false);
    // Nothing is re-keyed while it waits.
    expect(store.outbox[0].envelope.key).toBe(key);
  });
});
