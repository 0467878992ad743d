import { describe, expect, it } from 'vitest';
import { checkLineSet, liftLineShares, DEFAULT_MAX_SPAN_M, DEFAULT_SPREADER_SPACING_M, ftToM, lbToKg, spreaderPlatesDue, type LineSetCheckInput } from '@shared/rigging';

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

  it('refuses a batten whose weight is centred past its last lift line: it would tip (statics)', () => {
    const r = checkLineSet({ lengthM: 6, liftLines: [{ atM: 0 }, { atM: 3 }], pipeKgPerM: 0, pointLoads: [{ atM: 6, massKg: 50 }] });
    expect(r.map((w) => [w.code, w.severity])).toEqual([['batten-tips', 'error']]);
    expect(r[0].message).toMatch(/centred at 6 m, past lift line 2 \(at 3 m\)/);
  });

  it('warns, and does not refuse, when a lift line goes slack, saying what each line carries', () => {
    // 300 lb at 5 ft on the demo batten: 40 ft of 2.72 lb/ft pipe (ASME B36.10M, NPS 1-1/2 Sch 40) on lines 9 ft apart.
    const input: LineSetCheckInput = {
      lengthM: ftToM(40),
      liftLines: [2, 11, 20, 29, 38].map((ft) => ({ atM: ftToM(ft), ratedKg: lbToKg(500) })),
      pipeKgPerM: lbToKg(2.72) / ftToM(1),
      pointLoads: [{ atM: ftToM(5), massKg: lbToKg(300) }],
      units: 'imperial',
    };
    const r = checkLineSet(input);
    expect(r.map((w) => [w.code, w.severity])).toEqual([['lift-line-slack', 'warning']]);
    expect(r[0].message).toMatch(/^Lift line 3 \(at 20' 0"\) goes slack/);
    expect(r[0].message).toMatch(/Line 1 carries [\d.]+ lb, line 2 carries [\d.]+ lb, line 3 is slack, line 4 carries [\d.]+ lb, line 5 carries [\d.]+ lb\./);
    const shares = liftLineShares(input);
    if (!shares.holds) throw new Error('expected the batten to hang');
    expect(shares.lines.map((l) => l.slack)).toEqual([false, false, true, false, false]);
  });

  it('judges a lift line over its rating by what it carries with its neighbour slack', () => {
    // Lines at 0, 2 and 4 m; 10 kg at 4.5 m and 10 kg at 3 m: the line at 0 goes slack, the line at 4 m carries 17.5 kg (lever rule).
    const base = { lengthM: 5, pipeKgPerM: 0, pointLoads: [{ atM: 4.5, massKg: 10 }, { atM: 3, massKg: 10 }] };
    expect(codes({ ...base, liftLines: [{ atM: 0 }, { atM: 2 }, { atM: 4, ratedKg: 17.6 }] })).toEqual(['lift-line-slack']);
    expect(codes({ ...base, liftLines: [{ atM: 0 }, { atM: 2 }, { atM: 4, ratedKg: 17.4 }] })).toEqual(['lift-line-over', 'lift-line-slack']);
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

  it("refuses a span between lift lines longer than the venue's limit", () => {
    // 3.7 m and 4.7 m spans, both over 10 ft.
    expect(codes({ ...calm, liftLines: [{ atM: 0.3 }, { atM: 4 }, { atM: 8.7 }] })).toEqual(['span-too-long', 'span-too-long']);
    expect(codes({ ...calm, liftLines: [{ atM: 0.3 }, { atM: 4 }, { atM: 8.7 }], maxSpanM: 5 })).toEqual([]);
  });
});
