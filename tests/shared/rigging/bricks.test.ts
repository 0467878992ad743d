import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { chooseBricks, chooseBricksAtLeast, lbToKg, type BrickStock } from '@shared/rigging';

/** Every combination, for checking the searches on small stocks. */
function allCombinations(stock: BrickStock[]): { kg: number; bricks: number; counts: number[] }[] {
  let combos = [{ kg: 0, bricks: 0, counts: [] as number[] }];
  for (const s of stock) {
    const next: typeof combos = [];
    for (const c of combos) {
      for (let k = 0; k <= s.count; k++) next.push({ kg: c.kg + k * s.massKg, bricks: c.bricks + k, counts: [...c.counts, k] });
    }
    combos = next;
  }
  return combos;
}

const stockArb = fc.uniqueArray(
  fc.record({
    type: fc.constantFrom('full', 'half', 'quarter', 'slab', 'brass'),
    massKg: fc.oneof(fc.integer({ min: 1, max: 15 }), fc.double({ min: 0.5, max: 15, noNaN: true })),
    count: fc.integer({ min: 0, max: 5 }),
  }),
  { selector: (s) => s.type, minLength: 1, maxLength: 4 },
);

describe('chooseBricks', () => {
  it('is exact, not greedy: 9 kg from 3 kg and 5 kg bricks is 3 + 3 + 3 (issue example)', () => {
    const pick = chooseBricks(9, [{ type: 'five', massKg: 5, count: 5 }, { type: 'three', massKg: 3, count: 5 }]);
    expect(pick).toEqual({ picks: { three: 3 }, totalKg: 9 });
  });

  it('never exceeds the target and never takes more than the stock', () => {
    const pick = chooseBricks(40, [{ type: 'full', massKg: 9, count: 3 }, { type: 'half', massKg: 4.5, count: 1 }]);
    expect(pick).toEqual({ picks: { full: 3, half: 1 }, totalKg: 31.5 });
  });

  it('takes the fewest bricks among equal totals', () => {
    const full = lbToKg(25);
    const pick = chooseBricks(full * 2, [{ type: 'half', massKg: full / 2, count: 10 }, { type: 'full', massKg: full, count: 10 }]);
    expect(pick.picks).toEqual({ full: 2 });
  });

  it('picks nothing for a target below the lightest brick', () => {
    expect(chooseBricks(2, [{ type: 'full', massKg: 9, count: 3 }])).toEqual({ picks: {}, totalKg: 0 });
  });

  it('matches an exhaustive search on random stocks', () => {
    fc.assert(
      fc.property(stockArb, fc.double({ min: 0, max: 80, noNaN: true }), (stock, targetKg) => {
        const pick = chooseBricks(targetKg, stock);
        const fits = allCombinations(stock).filter((c) => c.kg <= targetKg + 1e-9);
        const bestKg = Math.max(...fits.map((c) => c.kg));
        const fewest = Math.min(...fits.filter((c) => Math.abs(c.kg - bestKg) <= 1e-9).map((c) => c.bricks));
        expect(pick.totalKg).toBeCloseTo(bestKg, 9);
        expect(Object.values(pick.picks).reduce((a, b) => a + b, 0)).toBe(fewest);
        for (const s of stock) expect(pick.picks[s.type] ?? 0).toBeLessThanOrEqual(s.count);
      }),
      { numRuns: 2000 },
    );
  });
});

describe('chooseBricksAtLeast', () => {
  it('pulls at least the weight asked, with as little over as the bricks allow', () => {
    const pick = chooseBricksAtLeast(10, [{ type: 'full', massKg: 9, count: 4 }, { type: 'half', massKg: 4.5, count: 1 }]);
    expect(pick).toEqual({ picks: { full: 1, half: 1 }, totalKg: 13.5 });
  });

  it('is null when the arbor holds too little', () => {
    expect(chooseBricksAtLeast(30, [{ type: 'full', massKg: 9, count: 3 }])).toBeNull();
  });

  it('matches an exhaustive search on random stocks', () => {
    fc.assert(
      fc.property(stockArb, fc.double({ min: 0, max: 80, noNaN: true }), (stock, minKg) => {
        const pick = chooseBricksAtLeast(minKg, stock);
        const enough = allCombinations(stock).filter((c) => c.kg >= minKg - 1e-9);
        if (!enough.length) {
          expect(pick).toBeNull();
          return;
        }
        const bestKg = Math.min(...enough.map((c) => c.kg));
        const fewest = Math.min(...enough.filter((c) => Math.abs(c.kg - bestKg) <= 1e-9).map((c) => c.bricks));
        expect(pick).not.toBeNull();
        expect(pick!.totalKg).toBeCloseTo(bestKg, 9);
        expect(Object.values(pick!.picks).reduce((a, b) => a + b, 0)).toBe(fewest);
      }),
      { numRuns: 2000 },
    );
  });
});
