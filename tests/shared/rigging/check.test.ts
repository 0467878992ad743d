import { describe, expect, it } from 'vitest';
import { checkLineSet, DEFAULT_MAX_SPAN_M, DEFAULT_SPREADER_SPACING_M, ftToM, lbToKg, spreaderPlatesDue, type LineSetCheckInput } from '@shared/rigging';

const codes = (input: LineSetCheckInput) => checkLineSet(input).map((w) => w.code);

/** A 12 m batten on four lines 3.6 m apart with 1 m overhangs... kept within every rating. */
const calm: LineSetCheckInput = {
  lengthM: 9,
  liftLines: [{ atM: 0.3, ratedKg: 500 }, { atM: 3.1, ratedKg: 500 }, { atM: 5.9, ratedKg: 500 }, { atM: 8.7, ratedKg: 500 }],
  pipeKgPerM: 4.05,
  spreadLoads: [{ fromM: 0, toM: 9, massKg: 60 }],
  battenRatedKgPerM: 30,
  battenRatedTotalKg: 400,
  arborKg: 40,
  bricks: { full: 8 },
  brickTypes: [{ type: 'full', massKg: 9, heightM: 0.05 }],
  arborCapacityKg: 600,
};

describe('checkLineSet', () => {
  it('finds nothing on a set within its ratings', () => {
    expect(checkLineSet(calm)).toEqual([]);
  });

  it('uses 24 in spreader spacing and 10 ft lift line spacing by default (common practice)', () => {
    expect(DEFAULT_SPREADER_SPACING_M).toBeCloseTo(0.6096, 12);
    expect(DEFAULT_MAX_SPAN_M).toBeCloseTo(3.048, 12);
    expect(spreaderPlatesDue(0.6096)).toBe(1);
    expect(spreaderPlatesDue(0.6)).toBe(0);
  });

  it('warns of a batten over its total and per-length rating (common practice: 15 to 30 lb/ft; venue rating governs)', () => {
    const ratedKgPerM = lbToKg(20) / ftToM(1);
    const heavy = { ...calm, battenRatedKgPerM: ratedKgPerM, battenRatedTotalKg: 200, spreadLoads: [{ fromM: 0, toM: 9, massKg: 300 }] };
    expect(codes(heavy)).toEqual(expect.arrayContaining(['batten-over-total', 'batten-over-per-length']));
    const message = checkLineSet({ ...heavy, units: 'imperial' }).find((w) => w.code === 'batten-over-per-length')!.message;
    expect(message).toMatch(/per foot/);
    expect(message).toMatch(/qualified rigger/);
  });

  it('warns of a heavy stretch that passes the average', () => {
    expect(codes({ ...calm, spreadLoads: [{ fromM: 2, toM: 3, massKg: 40 }] })).toEqual(['batten-concentrated']);
  });

  it('warns of a lift line over its rating, naming the line', () => {
    const r = checkLineSet({ ...calm, pointLoads: [{ atM: 3.1, massKg: 300 }], battenRatedTotalKg: undefined, battenRatedKgPerM: undefined, liftLines: calm.liftLines.map((l) => ({ ...l, ratedKg: 200 })) });
    expect(r.map((w) => w.code)).toEqual(['lift-line-over']);
    expect(r[0].message).toMatch(/Lift line 2/);
  });

  it('warns of a lift line going slack under a heavy overhang', () => {
    const r = codes({ lengthM: 6, liftLines: [{ atM: 0 }, { atM: 3 }], pipeKgPerM: 0, pointLoads: [{ atM: 6, massKg: 50 }] });
    expect(r).toEqual(['lift-line-slack']);
  });

  it('warns of an arbor over capacity', () => {
    expect(codes({ ...calm, arborCapacityKg: 100 })).toEqual(['arbor-over-capacity']);
  });

  it('warns when the brick stack is past the point a spreader plate is due (common practice: every 24 in)', () => {
    const tall = { ...calm, bricks: { full: 13 } }; // 13 × 5 cm = 65 cm of stack
    expect(codes(tall)).toEqual(['spreader-plate-due']);
    expect(codes({ ...tall, spreaderPlates: 1 })).toEqual([]);
    expect(codes({ ...tall, bricks: { full: 25 }, spreaderPlates: 1 })).toEqual(['spreader-plate-due']);
  });

  it("warns of a span between lift lines longer than the venue's limit", () => {
    // 3.7 m and 4.7 m spans, both over 10 ft.
    expect(codes({ ...calm, liftLines: [{ atM: 0.3 }, { atM: 4 }, { atM: 8.7 }] })).toEqual(['span-too-long', 'span-too-long']);
    expect(codes({ ...calm, liftLines: [{ atM: 0.3 }, { atM: 4 }, { atM: 8.7 }], maxSpanM: 5 })).toEqual([]);
  });
});
