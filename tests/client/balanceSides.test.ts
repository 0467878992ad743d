import { describe, expect, it } from 'vitest';
import { lbToKg } from '@shared/rigging';
import { balanceSides } from '@/utils/sessionText';

describe('balanceSides', () => {
  it('rounds each side once and shows their difference: 108.7 − 107.1 is 1.6, not the 1.7 of the exact difference', () => {
    // Exact: 108.74 − 107.06 = 1.68 lb, which alone would round to 1.7.
    expect(balanceSides(lbToKg(108.74), lbToKg(107.06), 'imperial')).toEqual({
      battenSide: '108.7 lb', arborSide: '107.1 lb', words: 'Pipe-heavy by 1.6 lb', side: 'pipe',
    });
  });

  it('says balanced exactly when the two figures shown are equal', () => {
    expect(balanceSides(lbToKg(140.04), lbToKg(139.96), 'imperial')).toEqual({
      battenSide: '140 lb', arborSide: '140 lb', words: 'Balanced', side: 'balanced',
    });
    expect(balanceSides(45.35, 45.45, 'metric').words).toBe('Arbor-heavy by 0.1 kg');
  });

  it('always shows figures that subtract to the balance shown, in either unit', () => {
    for (let i = 0; i < 2000; i++) {
      const batten = Math.random() * 400;
      const arbor = Math.random() * 400;
      for (const units of ['imperial', 'metric'] as const) {
        const f = balanceSides(batten, arbor, units);
        const b = parseFloat(f.battenSide);
        const a = parseFloat(f.arborSide);
        const shown = f.side === 'balanced' ? 0 : parseFloat(f.words.replace(/^\D+/, '')) * (f.side === 'pipe' ? 1 : -1);
        expect(Math.round((b - a) * 10)).toBe(Math.round(shown * 10));
      }
    }
  });
});
