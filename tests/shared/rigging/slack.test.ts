import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { ftToM, lbToKg, liftLineLoads, pipeMassPerMetre, slackAwareLiftLineLoads, type LiftLineLoadsInput } from '@shared/rigging';
import { referenceSlackLoads } from './unilateral-reference';

/** The demo venue's batten: 40 ft of NPS 1-1/2 Schedule 40 (ASME B36.10M) on five lines 9 ft apart. */
const demoBatten = (atFt: number, lb: number): LiftLineLoadsInput => ({
  lengthM: ftToM(40),
  liftLinesM: [2, 11, 20, 29, 38].map(ftToM),
  selfMassKgPerM: pipeMassPerMetre({ outsideDiameterMm: 48.26, wallMm: 3.68 }),
  pointLoads: [{ atM: ftToM(atFt), massKg: lbToKg(lb) }],
});

const totalKg = (b: LiftLineLoadsInput) =>
  b.selfMassKgPerM * b.lengthM + [...(b.pointLoads ?? []), ...(b.spreadLoads ?? [])].reduce((s, l) => s + l.massKg, 0);
const loadMoment = (b: LiftLineLoadsInput) =>
  (b.selfMassKgPerM * b.lengthM ** 2) / 2 +
  (b.pointLoads ?? []).reduce((s, p) => s + p.massKg * p.atM, 0) +
  (b.spreadLoads ?? []).reduce((s, l) => s + (l.massKg * (l.fromM + l.toM)) / 2, 0);

describe('slackAwareLiftLineLoads', () => {
  it.each([[5, 300, 3], [0, 150, 2]])('hangs %s ft / %s lb on the demo batten with line %s slack, where the rigid solution pushes it', (atFt, lb, line) => {
    const batten = demoBatten(atFt, lb);
    expect(liftLineLoads(batten)[line - 1]).toBeLessThan(0);
    const hung = slackAwareLiftLineLoads(batten);
    if (!hung.holds) throw new Error('expected the batten to hang');
    expect(hung.slackLines).toEqual([line - 1]);
    hung.loadsKg.forEach((kg) => expect(kg).toBeGreaterThanOrEqual(0));
    // Statics: the lines carry all the weight and balance its moment.
    expect(hung.loadsKg.reduce((a, b) => a + b, 0)).toBeCloseTo(totalKg(batten), 9);
    expect(hung.loadsKg.reduce((s, kg, i) => s + kg * batten.liftLinesM[i], 0)).toBeCloseTo(loadMoment(batten), 8);
    expect(referenceSlackLoads(batten)!.map((kg) => kg.toFixed(6))).toEqual(hung.loadsKg.map((kg) => kg.toFixed(6)));
  });

  it('gives the rigid solution when no line is pushed', () => {
    const batten = { lengthM: 6, liftLinesM: [0, 3, 6], selfMassKgPerM: 4 };
    expect(slackAwareLiftLineLoads(batten)).toEqual({ holds: true, loadsKg: liftLineLoads(batten), slackLines: [] });
  });

  it('shares the load on the two lines left by the lever rule once the third goes slack (statics)', () => {
    // Lines at 0, 2 and 4 m; 10 kg at 4.5 m and 10 kg at 3 m: the rigid beam pushes the line at 0 up.
    const batten = { lengthM: 5, liftLinesM: [0, 2, 4], selfMassKgPerM: 0, pointLoads: [{ atM: 4.5, massKg: 10 }, { atM: 3, massKg: 10 }] };
    expect(liftLineLoads(batten)[0]).toBeLessThan(0);
    const hung = slackAwareLiftLineLoads(batten);
    // On lines 2 and 4 alone: moments about 2 m give 4.5·... = (10·2.5 + 10·1) / 2 = 17.5 on the line at 4 m.
    expect(hung).toEqual({ holds: true, loadsKg: [0, expect.closeTo(2.5, 9), expect.closeTo(17.5, 9)], slackLines: [0] });
  });

  it('says the batten tips when the weight is centred past the last line (a cantilever no line can hold)', () => {
    // 10 kg 1 m past the right line of a weightless 2 m span: the rigid solution pushes the left line by 5 kg.
    expect(slackAwareLiftLineLoads({ lengthM: 3, liftLinesM: [0, 2], selfMassKgPerM: 0, pointLoads: [{ atM: 3, massKg: 10 }] }))
      .toEqual({ holds: false, tipsAbout: 1, centreM: 3 });
    // The pipe's own weight holds the same load back: 3 m × 10 kg/m centred at 1.5 m.
    const held = slackAwareLiftLineLoads({ lengthM: 3, liftLinesM: [0, 2], selfMassKgPerM: 10, pointLoads: [{ atM: 3, massKg: 10 }] });
    expect(held.holds).toBe(true);
  });

  it('answers in the order the lift lines were given', () => {
    const batten = demoBatten(5, 300);
    const shuffled = { ...batten, liftLinesM: [batten.liftLinesM[4], batten.liftLinesM[2], batten.liftLinesM[0], batten.liftLinesM[1], batten.liftLinesM[3]] };
    const a = slackAwareLiftLineLoads(batten);
    const b = slackAwareLiftLineLoads(shuffled);
    if (!a.holds || !b.holds) throw new Error('expected both to hang');
    expect(b.loadsKg.map((kg) => kg.toFixed(9))).toEqual([4, 2, 0, 1, 3].map((i) => a.loadsKg[i].toFixed(9)));
  });

  // Random battens, weighted towards long overhangs and heavy end loads so lines go slack often.
  const fraction = fc.integer({ min: 0, max: 1000 }).map((n) => n / 1000);
  // Nothing, or at least 10 g: a microgram load is round-off to both solutions, not a batten.
  const kg = (max: number) => fc.oneof(fc.constant(0), fc.double({ min: 0.01, max, noNaN: true }));
  const battenArb: fc.Arbitrary<LiftLineLoadsInput> = fc
    .record({
      lengthM: fc.double({ min: 3, max: 20, noNaN: true }),
      lineFractions: fc.uniqueArray(fc.integer({ min: 0, max: 100 }), { minLength: 2, maxLength: 6 }),
      selfMassKgPerM: kg(10),
      points: fc.array(fc.record({ at: fraction, massKg: kg(200) }), { maxLength: 4 }),
      spreads: fc.array(fc.record({ a: fraction, b: fraction, massKg: kg(200) }), { maxLength: 2 }),
    })
    .map(({ lengthM, lineFractions, selfMassKgPerM, points, spreads }) => ({
      lengthM,
      liftLinesM: lineFractions.map((f) => (f / 100) * lengthM),
      selfMassKgPerM,
      pointLoads: points.map((p) => ({ atM: p.at * lengthM, massKg: p.massKg })),
      spreadLoads: spreads.map((s) => ({ fromM: Math.min(s.a, s.b) * lengthM, toM: Math.max(s.a, s.b) * lengthM, massKg: s.massKg })),
    }));

  it('agrees with an independent enumeration of taut-line sets on a finite-element beam (mathjs) on random battens', () => {
    let slackSeen = 0;
    let tipsSeen = 0;
    fc.assert(
      fc.property(battenArb, (batten) => {
        const ours = slackAwareLiftLineLoads(batten);
        const reference = referenceSlackLoads(batten);
        if (!ours.holds) {
          tipsSeen++;
          expect(reference).toBeNull();
          return;
        }
        expect(reference).not.toBeNull();
        if (ours.slackLines.length) slackSeen++;
        const scale = Math.max(1, totalKg(batten), ...reference!);
        ours.loadsKg.forEach((kg, i) => expect(Math.abs(kg - reference![i])).toBeLessThan(1e-6 * scale));
      }),
      { numRuns: 300, endOnFailure: true },
    );
    // The arbitrary must reach the cases this is about.
    expect(slackSeen).toBeGreaterThan(20);
    expect(tipsSeen).toBeGreaterThan(0);
  });

  it('never pushes a line and carries the whole load with its moment, on random battens (statics)', () => {
    fc.assert(
      fc.property(battenArb, (batten) => {
        const ours = slackAwareLiftLineLoads(batten);
        const scale = Math.max(1, totalKg(batten));
        if (!ours.holds) {
          const lines = batten.liftLinesM;
          expect(ours.centreM < Math.min(...lines) || ours.centreM > Math.max(...lines)).toBe(true);
          return;
        }
        ours.loadsKg.forEach((kg) => expect(kg).toBeGreaterThanOrEqual(0));
        ours.slackLines.forEach((i) => expect(ours.loadsKg[i]).toBe(0));
        expect(Math.abs(ours.loadsKg.reduce((a, b) => a + b, 0) - totalKg(batten))).toBeLessThan(1e-9 * scale);
        const lineMoment = ours.loadsKg.reduce((s, kg, i) => s + kg * batten.liftLinesM[i], 0);
        expect(Math.abs(lineMoment - loadMoment(batten))).toBeLessThan(1e-8 * scale * batten.lengthM);
      }),
      { numRuns: 1000, endOnFailure: true },
    );
  });
});
