import { describe, expect, it } from 'vitest';
import { spokenLineSet, spokenReAlert, spokenWords } from '@/utils/spokenCalls';
import { VIBRATION_PATTERNS } from '@/composables/useAlertSignal';

const entry = (kind: string, details: Record<string, unknown> = {}, personName = 'Sam Brightwater') => ({ kind, details, personName });

describe('spokenWords', () => {
  it('says the calls of the trade, short', () => {
    const ls = { lineSetName: 'Line set 12 (LX truss)' };
    expect(spokenWords(entry('move-called', ls), 'loader')).toBe('Line set 12 coming in');
    expect(spokenWords(entry('locked', ls), 'deck')).toBe('Line set 12 in and locked');
    expect(spokenWords(entry('rail-clear-called', ls), 'rail')).toBe('Clear the rail');
    expect(spokenWords(entry('loading-complete', ls), 'rail')).toBe('Loading complete');
    expect(spokenWords(entry('hold-called', { reason: 'Someone under the gallery' }), 'deck')).toBe('Hold, hold, hold. Someone under the gallery');
    expect(spokenWords(entry('hold-called', {}), 'deck')).toBe('Hold, hold, hold');
    expect(spokenWords(entry('test-recorded', { ...ls, result: 'balanced' }), 'stage-manager')).toBe('Line set 12 tested, balanced');
  });

  it('tells only the rail operator who answered clear', () => {
    expect(spokenWords(entry('clear-answered', {}), 'rail')).toBe('Sam, clear');
    expect(spokenWords(entry('clear-answered', {}), 'loader')).toBeNull();
  });

  it('stays quiet for entries that are not calls', () => {
    for (const kind of ['note', 'joined', 'refused', 'step-confirmed']) expect(spokenWords(entry(kind), 'rail')).toBeNull();
  });

  it('names a line set by its number, or by its name when it has none', () => {
    expect(spokenLineSet('Line set 7 (Sea-mist drapes)')).toBe('Line set 7');
    expect(spokenLineSet('12')).toBe('Line set 12');
    expect(spokenLineSet('Practice line set 93')).toBe('Practice line set 93');
    expect(spokenLineSet(undefined)).toBe('The line set');
    expect(spokenReAlert('Line set 4A (Main curtain)')).toBe('Line set 4A coming in. Answer clear');
  });
});

describe('alert vibration patterns', () => {
  it('differ for every kind of alert, so a phone in a pocket says which it is', () => {
    const patterns = Object.values(VIBRATION_PATTERNS).map((p) => p.join(','));
    expect(new Set(patterns).size).toBe(patterns.length);
  });
});
