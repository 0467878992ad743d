import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import {
  applyStep, brickRuns, M_PER_IN, planChange, spreaderPlatesAt, stackHeightM,
  type BrickCounts, type BrickType, type PlanInput, type PlanStep,
} from '@shared/rigging';

/** A spreader plate every 24 in of stack (common practice; the venue setting's default). */
const SPACING_M = 24 * M_PER_IN;
const twoInch: BrickType = { type: 'full', massKg: 9, heightM: 2 * M_PER_IN };

/** An empty arbor taking a 405 kg piece: 45 bricks of 9 kg balance it (405 / 9 = 45). */
const bigPiece = (brick: BrickType): PlanInput => ({
  purchase: 1,
  pipeKg: 30,
  arborKg: 30,
  pieces: [],
  bricks: {},
  brickTypes: [brick],
  bridgeStock: { full: 60 },
  remove: [],
  add: [{ id: 'flat', massKg: 405 }],
  ropeLockLimitKg: 22,
  spreaderSpacingM: SPACING_M,
});

const brickStep = (steps: PlanStep[]) => steps.find((s) => s.kind === 'add-bricks' || s.kind === 'remove-bricks')!;

describe('spreader plates in a plan: worked examples', () => {
  it('puts a plate after the 12th, 24th and 36th of 45 bricks of 2 in on an empty arbor', () => {
    // 12 x 2 in = 24 in, 24 x 2 in = 48 in, 36 x 2 in = 72 in; 45 x 2 in = 90 in stays under 96 in,
    // so floor(90 / 24) = 3 plates in all.
    const r = planChange(bigPiece(twoInch));
    const step = brickStep(r.steps);
    expect(step).toMatchObject({ kind: 'add-bricks', bricks: { full: 45 }, spreaderPlatesAt: [12, 24, 36] });
  });

  it('puts the first plate after the 13th brick when bricks are 1.875 in', () => {
    // 12 x 1.875 in = 22.5 in (short of 24 in), 13 x 1.875 in = 24.375 in: the 13th brick passes 24 in.
    // 26 x 1.875 = 48.75 passes 48 (25 x 1.875 = 46.875 does not); 39 x 1.875 = 73.125 passes 72
    // (38 x 1.875 = 71.25 does not); 45 x 1.875 = 84.375 stays under 96.
    const r = planChange(bigPiece({ ...twoInch, heightM: 1.875 * M_PER_IN }));
    expect(brickStep(r.steps).spreaderPlatesAt).toEqual([13, 26, 39]);
  });

  it('counts the bricks already on the arbor', () => {
    // 5 bricks of 2 in stand 10 in; loading 7 more reaches 24 in, 19 more 48 in, 31 more 72 in, 43 more 96 in.
    expect(spreaderPlatesAt('add-bricks', { full: 5 }, { full: 45 }, [twoInch], SPACING_M)).toEqual([7, 19, 31, 43]);
  });

  it('takes a plate off just before the brick it rests on when unloading', () => {
    // 30 bricks of 2 in stand 60 in with plates at 24 in and 48 in. Pulling 6 brings the stack down to
    // 48 in, to the plate: it comes off before the 7th brick (60 - 7 x 2 = 46 in), so after 6 of 10.
    const input: PlanInput = {
      ...bigPiece(twoInch), pieces: [{ id: 'drape', massKg: 90 }], bricks: { full: 30 }, pipeKg: 30 + 180,
      bridgeStock: {}, add: [], remove: ['drape'],
    };
    const r = planChange(input);
    expect(brickStep(r.steps)).toMatchObject({ kind: 'remove-bricks', bricks: { full: 10 }, spreaderPlatesAt: [6] });
  });

  it('says nothing of plates when a brick height is unknown, or the step passes none', () => {
    const unknown = planChange(bigPiece({ type: 'full', massKg: 9 }));
    expect(brickStep(unknown.steps).spreaderPlatesAt).toBeUndefined();
    const few = planChange({ ...bigPiece(twoInch), add: [{ id: 'flat', massKg: 9 * 11 }] });
    // 11 x 2 in = 22 in: under 24 in, no plate.
    expect(brickStep(few.steps)).toMatchObject({ bricks: { full: 11 } });
    expect(brickStep(few.steps).spreaderPlatesAt).toBeUndefined();
    expect(spreaderPlatesAt('add-bricks', { full: 2, odd: 1 }, { full: 20 }, [twoInch], SPACING_M)).toBeNull();
  });

  it('cuts a step into runs at its plates, in the order of the brick types', () => {
    const half: BrickType = { type: 'half', massKg: 4.5, heightM: 1 * M_PER_IN };
    expect(brickRuns({ full: 10, half: 4 }, [twoInch, half], [9])).toEqual([
      { bricks: { full: 9 }, plateAfter: true },
      { bricks: { full: 1, half: 4 }, plateAfter: false },
    ]);
    expect(brickRuns({ full: 3 }, [twoInch], [0])).toEqual([{ bricks: {}, plateAfter: true }, { bricks: { full: 3 }, plateAfter: false }]);
  });
});

/** Plate positions by a different route, in whole millimetres: plate k goes where the stack first reaches k spacings. */
function referencePlates(kind: 'add-bricks' | 'remove-bricks', startMm: number, stepMm: number[], spacingMm: number): number[] {
  const plates = (h: number) => Math.floor(h / spacingMm);
  const heights = [startMm];
  for (const h of stepMm) heights.push(kind === 'add-bricks' ? heights.at(-1)! + h : heights.at(-1)! - h);
  const at: number[] = [];
  if (kind === 'add-bricks') {
    for (let k = plates(startMm) + 1; k <= plates(heights.at(-1)!); k++) at.push(heights.findIndex((h) => h >= k * spacingMm));
  } else {
    // Plate k comes off before the brick that takes the stack below k spacings: after (that brick's number - 1).
    for (let k = plates(startMm); k > plates(heights.at(-1)!); k--) at.push(heights.findIndex((h) => h < k * spacingMm) - 1);
  }
  return at;
}

describe('spreader plates: property', () => {
  const typesArb = fc.uniqueArray(
    fc.record({ type: fc.constantFrom('full', 'half', 'quarter'), heightMm: fc.integer({ min: 10, max: 120 }) }),
    { minLength: 1, maxLength: 3, selector: (b) => b.type },
  );

  it('places one plate at each count where floor(stack height / spacing) goes up (or down when unloading)', () => {
    fc.assert(fc.property(
      typesArb,
      fc.integer({ min: 150, max: 900 }),
      fc.constantFrom<'add-bricks' | 'remove-bricks'>('add-bricks', 'remove-bricks'),
      fc.array(fc.integer({ min: 0, max: 40 }), { minLength: 3, maxLength: 3 }),
      fc.array(fc.integer({ min: 0, max: 40 }), { minLength: 3, maxLength: 3 }),
      (types, spacingMm, kind, onArbor, inStep) => {
        const brickTypes: BrickType[] = types.map((t) => ({ type: t.type, massKg: 5, heightM: t.heightMm / 1000 }));
        const arbor: BrickCounts = Object.fromEntries(types.map((t, i) => [t.type, onArbor[i]]));
        // Unloading takes off no more than the arbor holds.
        const step: BrickCounts = Object.fromEntries(types.map((t, i) => [t.type, kind === 'add-bricks' ? inStep[i] : Math.min(inStep[i], onArbor[i])]));
        const startMm = types.reduce((sum, t, i) => sum + t.heightMm * onArbor[i], 0);
        const stepMm = types.flatMap((t) => Array<number>(step[t.type]).fill(t.heightMm));
        const got = spreaderPlatesAt(kind, arbor, step, brickTypes, spacingMm / 1000);
        expect(got).toEqual(referencePlates(kind, startMm, stepMm, spacingMm));
        // And the runs put every brick of the step back together.
        const runs = brickRuns(step, brickTypes, got!);
        const total = (c: BrickCounts) => Object.values(c).reduce((a, b) => a + b, 0);
        expect(runs.reduce((sum, r) => sum + total(r.bricks), 0)).toBe(total(step));
        expect(runs.filter((r) => r.plateAfter).length).toBe(got!.length);
      },
    ));
  });

  it('keeps the plan\'s plates equal to the change in floor(stack height / spacing) at every brick step', () => {
    fc.assert(fc.property(
      fc.integer({ min: 1, max: 60 }), fc.integer({ min: 0, max: 40 }), fc.integer({ min: 20, max: 80 }),
      (loadBricks, startBricks, heightMm) => {
        const brick: BrickType = { type: 'full', massKg: 9, heightM: heightMm / 1000 };
        const input: PlanInput = {
          ...bigPiece(brick), bricks: { full: startBricks }, pipeKg: 30 + 9 * startBricks,
          add: [{ id: 'flat', massKg: 9 * loadBricks }],
        };
        const r = planChange(input);
        let load = { purchase: input.purchase, pipeKg: input.pipeKg, arborKg: input.arborKg, pieces: input.pieces, bricks: input.bricks };
        for (const step of r.steps) {
          const before = Math.floor(stackHeightM(load.bricks, [brick])! / SPACING_M + 1e-9);
          load = applyStep(load, step, [brick]);
          const after = Math.floor(stackHeightM(load.bricks, [brick])! / SPACING_M + 1e-9);
          expect(step.spreaderPlatesAt?.length ?? 0).toBe(Math.abs(after - before));
        }
      },
    ));
  });
});
