import { describe, expect, it } from 'vitest';
import { lineSetMatches } from '@/utils/lineSetSearch';

const harbourSky = {
  number: 5, name: 'Harbour sky', notes: 'Keep clear of the pin rail',
  pieces: [{ name: 'Sky drop, dusk', department: 'Soft goods' }],
} as Parameters<typeof lineSetMatches>[0];

describe('finding a line set as a crew types', () => {
  it('matches the number, the name, the notes and a piece name or department, in any case', () => {
    for (const term of ['5', 'harbour', 'SKY', 'pin rail', 'dusk', 'soft goods']) expect(lineSetMatches(harbourSky, term), term).toBe(true);
  });
  it('matches everything for an empty or blank search, and nothing for a word that is not there', () => {
    expect(lineSetMatches(harbourSky, '')).toBe(true);
    expect(lineSetMatches(harbourSky, '   ')).toBe(true);
    expect(lineSetMatches(harbourSky, null)).toBe(true);
    expect(lineSetMatches(harbourSky, 'electric')).toBe(false);
  });
});
