import { beforeEach, describe, expect, it } from 'vitest';
import { createPinia, setActivePinia } from 'pinia';
import { logTime, clockTime } from '@/utils/sessionText';
import { acceptedWords } from '@/stores/liveSession';
import { useNoticesStore } from '@/stores/notices';

describe('logTime', () => {
  const now = new Date(2026, 11, 2, 15, 0, 0).getTime();

  it('shows the time of day alone for an entry made today', () => {
    const at = new Date(2026, 11, 2, 9, 5, 7).getTime();
    expect(logTime(at, now)).toBe(clockTime(at));
  });

  it('adds the day, month as a word, for an entry of another day', () => {
    const at = new Date(2026, 11, 1, 23, 59, 0).getTime();
    const text = logTime(at, now);
    expect(text.endsWith(`, ${clockTime(at)}`)).toBe(true);
    expect(text).toMatch(/1/);
    expect(text).not.toMatch(/^\d+\/\d+/);
  });

  it('adds the year for an entry of another year', () => {
    const at = new Date(2025, 11, 2, 9, 0, 0).getTime();
    expect(logTime(at, now)).toMatch(/2025/);
  });
});

describe('acceptedWords', () => {
  it('confirms a test record in words, with the estimate in the venue units', () => {
    expect(acceptedWords({ type: 'record-test', result: 'balanced' })).toBe('Test recorded: balanced.');
    expect(acceptedWords({ type: 'record-test', result: 'pipe-heavy', estimateKg: 10 }, 'metric')).toBe('Test recorded: pipe-heavy by 10 kg.');
  });

  it('says nothing for taps whose result the screen itself shows', () => {
    expect(acceptedWords({ type: 'call-move' })).toBeNull();
  });
});

describe('notices store', () => {
  beforeEach(() => setActivePinia(createPinia()));

  it('replaces a notice with the same words instead of stacking a copy', () => {
    const store = useNoticesStore();
    store.push('negative', 'That step is already done.');
    store.push('negative', 'That step is already done.');
    expect(store.notices).toHaveLength(1);
  });

  it('clears the refusals of one tag together, keeping the rest', () => {
    const store = useNoticesStore();
    store.push('negative', 'Refused once.', { tag: 'session-refusal' });
    store.push('info', 'Something else.');
    store.clearTag('session-refusal');
    expect(store.notices.map((n) => n.message)).toEqual(['Something else.']);
  });

  it('keeps at most three notices, the newest first', () => {
    const store = useNoticesStore();
    for (const n of [1, 2, 3, 4]) store.push('negative', `Notice ${n}`);
    expect(store.notices.map((n) => n.message)).toEqual(['Notice 4', 'Notice 3', 'Notice 2']);
  });
});
