import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { liftLineLoads, type LiftLineLoadsInput } from '@shared/rigging';
import { referenceLiftLineLoads } from './stiffness-reference';

const TABLES = 'beam formula tables (Hicks, Civil Engineering Formulas, Table 2.1; AISC Manual, Beam Diagrams and Formulas)';

describe('liftLineLoads', () => {
  it(`gives 0.375, 1.25, 0.375 × wL for two equal spans under uniform load (${TABLES})`, () => {
    const w = 6;
    const L = 3;
    const loads = liftLineLoads({ lengthM: 2 * L, liftLinesM: [0, L, 2 * L], selfMassKgPerM: w });
    [0.375, 1.25, 0.375].forEach((c, i) => expect(loads[i]).toBeCloseTo(c * w * L, 10));
  });

  it(`gives 0.4, 1.1, 1.1, 0.4 × wL for three equal spans under uniform load (${TABLES})`, () => {
    const w = 4;
    const L = 2.5;
    const loads = liftLineLoads({ lengthM: 3 * L, liftLinesM: [0, L, 2 * L, 3 * L], selfMassKgPerM: 0, spreadLoads: [{ fromM: 0, toM: 3 * L, massKg: 3 * w * L }] });
    [0.4, 1.1, 1.1, 0.4].forEach((c, i) => expect(loads[i]).toBeCloseTo(c * w * L, 10));
  });

  it('shares a point load on two lift lines by the lever rule (statics)', () => {
    expect(liftLineLoads({ lengthM: 3, liftLinesM: [0, 3], selfMassKgPerM: 0, pointLoads: [{ atM: 1, massKg: 30 }] }))
      .toEqual([20, 10]);
  });

  it('carries an overhang load on the end line and lifts its neighbour (statics)', () => {
    // 10 kg hung 1 m past the right line of a 2 m span: the right line takes 15, the left is pushed up by 5.
    const [left, right] = liftLineLoads({ lengthM: 3, liftLinesM: [0, 2], selfMassKgPerM: 0, pointLoads: [{ atM: 3, massKg: 10 }] });
    expect(left).toBeCloseTo(-5, 12);
    expect(right).toBeCloseTo(15, 12);
  });

  it('answers in the order the lift lines were given', () => {
    const inOrder = liftLineLoads({ lengthM: 6, liftLinesM: [0, 2, 6], selfMassKgPerM: 3 });
    const shuffled = liftLineLoads({ lengthM: 6, liftLinesM: [6, 0, 2], selfMassKgPerM: 3 });
    expect(shuffled).toEqual([inOrder[2], inOrder[0], inOrder[1]]);
  });

  it('treats a spread load of no width as a point load', () => {
    const spread = liftLineLoads({ lengthM: 3, liftLinesM: [0, 3], selfMassKgPerM: 0, spreadLoads: [{ fromM: 1, toM: 1, massKg: 30 }] });
    expect(spread).toEqual([20, 10]);
  });

  it('refuses a batten with fewer than two lift lines or a line off the batten', () => {
    expect(() => liftLineLoads({ lengthM: 6, liftLinesM: [3], selfMassKgPerM: 3 })).toThrow(RangeError);
    expect(() => liftLineLoads({ lengthM: 6, liftLinesM: [0, 7], selfMassKgPerM: 3 })).toThrow(RangeError);
  });

  // Positions on a millimetre-ish grid of the batten, so no element of the reference model is vanishingly short.
  const fraction = fc.integer({ min: 0, max: 1000 }).map((n) => n / 1000);
  const battenArb: fc.Arbitrary<LiftLineLoadsInput> = fc
    .record({
      lengthM: fc.double({ min: 3, max: 20, noNaN: true }),
      lineFractions: fc.uniqueArray(fc.integer({ min: 0, max: 100 }), { minLength: 2, maxLength: 8 }),
      selfMassKgPerM: fc.double({ min: 0, max: 10, noNaN: true }),
      points: fc.array(fc.record({ at: fraction, massKg: fc.double({ min: 0, max: 200, noNaN: true }) }), { maxLength: 6 }),
      spreads: fc.array(
        fc.record({ a: fraction, b: fraction, massKg: fc.double({ min: 0, max: 200, noNaN: true }) }),
        { maxLength: 4 },
      ),
    })
    .map(({ lengthM, lineFractions, selfMassKgPerM, points, spreads }) => ({
      lengthM,
      liftLinesM: lineFractions.map((f) => (f / 100) * lengthM),
      selfMassKgPerM,
      pointLoads: points.map((p) => ({ atM: p.at * lengthM, massKg: p.massKg })),
      spreadLoads: spreads.map((s) => ({ fromM: Math.min(s.a, s.b) * lengthM, toM: Math.max(s.a, s.b) * lengthM, massKg: s.massKg })),
    }));

  const totalKg = (b: LiftLineLoadsInput) =>
    b.selfMassKgPerM * b.lengthM + [...(b.pointLoads ?? []), ...(b.spreadLoads ?? [])].reduce((s, l) => s + l.massKg, 0);

  it('agrees with an independent finite-element stiffness assembly (mathjs) on random battens', () => {
    fc.assert(
      fc.property(battenArb, (batten) => {
        const ours = liftLineLoads(batten);
        const reference = referenceLiftLineLoads(batten);
        // The reference's own round-off grows with the largest line load (short spans under long overhangs).
        const scale = Math.max(1, totalKg(batten), ...reference.map(Math.abs));
        ours.forEach((kg, i) => expect(Math.abs(kg - reference[i])).toBeLessThan(1e-6 * scale));
      }),
      { numRuns: 500 },
    );
  });

  it('carries the whole load, and balances its moments, on random battens (statics)', () => {
    fc.assert(
      fc.property(battenArb, (batten) => {
        const loads = liftLineLoads(batten);
        const scale = Math.max(1, totalKg(batten));
        expect(Math.abs(loads.reduce((a, b) => a + b, 0) - totalKg(batten))).toBeLessThan(1e-9 * scale);
        const loadMoment =
          (batten.selfMassKgPerM * batten.lengthM ** 2) / 2 +
          (batten.pointLoads ?? []).reduce((s, p) => s + p.massKg * p.atM, 0) +
          (batten.spreadLoads ?? []).reduce((s, l) => s + (l.massKg * (l.fromM + l.toM)) / 2, 0);
        const lineMoment = loads.reduce((s, kg, i) => s + kg * batten.liftLinesM[i], 0);
        expect(Math.abs(lineMoment - loadMoment)).toBeLessThan(1e-9 * scale * batten.lengthM);
      }),
      { numRuns: 1000 },
    );
  });
});
