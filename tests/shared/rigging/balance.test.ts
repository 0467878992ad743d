import { describe, expect, it } from 'vitest';
import { balancingArborKg, imbalanceKg, lbToKg } from '@shared/rigging';

describe('imbalanceKg', () => {
  it('is batten side minus arbor side on single purchase; positive is pipe-heavy (balance is judged at the batten: the common trade definition)', () => {
    expect(imbalanceKg({ battenSideKg: 100, arborSideKg: 90, purchase: 1 })).toBe(10);
    expect(imbalanceKg({ battenSideKg: 100, arborSideKg: 110, purchase: 1 })).toBe(-10);
  });

  it('balances 300 lb on the batten with 600 lb on the arbor on double purchase (stage rigging handbooks: 2:1 double purchase)', () => {
    expect(imbalanceKg({ battenSideKg: lbToKg(300), arborSideKg: lbToKg(600), purchase: 2 })).toBeCloseTo(0, 12);
    expect(balancingArborKg(lbToKg(300), 2)).toBeCloseTo(lbToKg(600), 12);
    expect(balancingArborKg(lbToKg(300), 1)).toBeCloseTo(lbToKg(300), 12);
  });
});
