import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { applyStep, bricksMassKg, correctionSteps, type BrickType, type CorrectionInput, type LineSetLoad } from '@shared/rigging';

/** 1 lb = 0.45359237 kg exactly (international yard and pound agreement, 1959; NIST SP 811). */
const LB = 0.45359237;
/** Full and half bricks of 20 and 10 lb: one of the pairs in use (trade references: 40/20, 30/15 and 20/10 lb pairs are in use). */
const bricks20: BrickType[] = [{ type: 'full', massKg: 20 * LB }, { type: 'half', massKg: 10 * LB }];
/** Rope lock default, 50 lb (common practice). */
const LOCK = 50 * LB;

const base: CorrectionInput = {
  measuredKg: 0,
  purchase: 1,
  arborKg: 60 * LB,
  bricks: { full: 10 },
  brickTypes: bricks20,
  bridgeStock: { full: 10, half: 4 },
  ropeLockLimitKg: LOCK,
  tiedOff: false,
  units: 'imperial',
};

describe('correctionSteps', () => {
  it('adds the bricks a pipe-heavy test found missing, then asks for a new test', () => {
    // 30 lb pipe-heavy at single purchase: one full and one half brick (20 + 10 lb) balance it exactly.
    const r = correctionSteps({ ...base, measuredKg: 30 * LB });
    expect(r.warnings).toEqual([]);
    expect(r.steps.map((s) => s.kind)).toEqual(['add-bricks', 'test-balance']);
    expect(r.steps[0].bricks).toEqual({ full: 1, half: 1 });
    expect(r.expectedKg).toBeCloseTo(0, 6);
  });

  it('says where a spreader plate goes when the correction bricks cross a multiple of the spacing (24 in: common practice)', () => {
    const IN = 0.0254; // 1 in = 25.4 mm exactly (international yard, 1959)
    const stacked = bricks20.map((b) => ({ ...b, heightM: (b.type === 'full' ? 2 : 1) * IN }));
    // Ten 2 in full bricks stand 20 in; 30 lb pipe-heavy adds one full (to 22 in) then one half (to 23 in): no plate yet.
    expect(correctionSteps({ ...base, brickTypes: stacked, measuredKg: 30 * LB, spreaderSpacingM: 24 * IN }).steps[0].spreaderPlatesAt).toBeUndefined();
    // 50 lb adds two full bricks (to 24 in: the plate goes on after the 2nd) and one half.
    const r = correctionSteps({ ...base, brickTypes: stacked, measuredKg: 50 * LB, ropeLockLimitKg: 60 * LB, spreaderSpacingM: 24 * IN });
    expect(r.steps[0].bricks).toEqual({ full: 2, half: 1 });
    expect(r.steps[0].spreaderPlatesAt).toEqual([2]);
    // Without the spacing (sessions kept before it was), no plates are named.
    expect(correctionSteps({ ...base, brickTypes: stacked, measuredKg: 50 * LB, ropeLockLimitKg: 60 * LB }).steps[0].spreaderPlatesAt).toBeUndefined();
  });

  it('at double purchase adds twice the measured weight (stage rigging handbooks: 2:1 double purchase)', () => {
    const r = correctionSteps({ ...base, purchase: 2, measuredKg: 20 * LB });
    expect(bricksMassKg(r.steps[0].bricks!, bricks20)).toBeCloseTo(40 * LB, 9);
  });

  it('takes off at least what an arbor-heavy test found, leaving it pipe-heavy or balanced', () => {
    const r = correctionSteps({ ...base, measuredKg: -25 * LB });
    expect(r.steps[0]).toMatchObject({ kind: 'remove-bricks', bricks: { full: 2 } });
    expect(r.expectedKg).toBeCloseTo(15 * LB, 6);
  });

  it('keeps a set out beyond the rope lock tied off through the bricks, and unties it before the test', () => {
    const r = correctionSteps({ ...base, measuredKg: 80 * LB, tiedOff: true });
    expect(r.steps.map((s) => s.kind)).toEqual(['add-bricks', 'untie', 'test-balance']);
    expect(correctionSteps({ ...base, measuredKg: 80 * LB }).warnings[0].code).toBe('not-tied-off');
  });

  it('refuses with the figures when the bridge or the arbor cannot take it within the rope lock', () => {
    const bridge = correctionSteps({ ...base, measuredKg: 120 * LB, tiedOff: true, bridgeStock: { full: 1 } });
    expect(bridge.steps).toEqual([]);
    expect(bridge.warnings[0].message).toBe(
      'It needs 120 lb of bricks on the arbor, but the loading bridge holds only 20 lb of bricks: it would stay pipe-heavy by 100 lb, more than the rope lock holds (50 lb). Keep it tied off and check with a qualified rigger.',
    );
    const arbor = correctionSteps({ ...base, measuredKg: 120 * LB, tiedOff: true, arborCapacityKg: 300 * LB });
    expect(arbor.warnings[0].message).toMatch(/the arbor can take only 40 lb more \(capacity 300 lb, carrying 260 lb\)/);
  });

  it('says when the imbalance is smaller than the lightest brick', () => {
    expect(correctionSteps({ ...base, measuredKg: 4 * LB }).warnings[0]).toMatchObject({ code: 'nothing-to-correct' });
  });

  it('never leaves a step arbor-heavy, by the measured figure, whatever the set (property)', () => {
    const brickType = fc.record({ type: fc.constantFrom('a', 'b', 'c'), massKg: fc.double({ min: 0.5, max: 25, noNaN: true }) });
    fc.assert(
      fc.property(
        fc.uniqueArray(brickType, { minLength: 1, maxLength: 3, selector: (b) => b.type }),
        fc.double({ min: -200, max: 200, noNaN: true }),
        fc.constantFrom(1 as const, 2 as const),
        fc.dictionary(fc.constantFrom('a', 'b', 'c'), fc.integer({ min: 0, max: 30 })),
        fc.dictionary(fc.constantFrom('a', 'b', 'c'), fc.integer({ min: 0, max: 30 })),
        fc.option(fc.double({ min: 20, max: 1500, noNaN: true }), { nil: undefined }),
        fc.double({ min: 0, max: 40, noNaN: true }),
        (brickTypes, measuredKg, purchase, onArbor, onBridge, arborCapacityKg, ropeLockLimitKg) => {
          const known = (c: Record<string, number>) => Object.fromEntries(Object.entries(c).filter(([t]) => brickTypes.some((b) => b.type === t)));
          const input: CorrectionInput = {
            measuredKg, purchase, arborKg: 20, bricks: known(onArbor), brickTypes, bridgeStock: known(onBridge),
            arborCapacityKg, ropeLockLimitKg, tiedOff: Math.abs(measuredKg) > ropeLockLimitKg,
          };
          const r = correctionSteps(input);
          if (r.warnings.some((w) => w.severity === 'error')) {
            expect(r.steps).toEqual([]);
            return;
          }
          // Replay the steps on the arbor and reckon the balance from the measurement, independently of the function's own figures.
          let load: LineSetLoad = { purchase, pipeKg: 0, arborKg: input.arborKg, pieces: [], bricks: { ...input.bricks } };
          const startArborKg = input.arborKg + bricksMassKg(load.bricks, brickTypes);
          for (const step of r.steps) {
            load = applyStep(load, step, brickTypes);
            const arborKg = load.arborKg + bricksMassKg(load.bricks, brickTypes);
            const afterKg = measuredKg - (arborKg - startArborKg) / purchase;
            expect(afterKg).toBeGreaterThanOrEqual(-1e-6);
            expect(step.imbalanceAfterKg).toBeCloseTo(afterKg, 5);
            if (arborCapacityKg !== undefined && step.kind === 'add-bricks') expect(arborKg).toBeLessThanOrEqual(arborCapacityKg + 1e-6);
            if (step.kind === 'add-bricks') {
              for (const [t, n] of Object.entries(step.bricks!)) expect(n).toBeLessThanOrEqual(input.bridgeStock[t] ?? 0);
            }
          }
          // It ends within what the rope lock holds, untied, with a new test.
          expect(r.expectedKg).toBeLessThanOrEqual(ropeLockLimitKg + 1e-6);
          expect(r.steps.at(-1)!.kind).toBe('test-balance');
          expect(r.steps.some((s) => s.kind === 'untie')).toBe(input.tiedOff);
        },
      ),
      { numRuns: 2000, seed: 20261202 },
    );
  });
});
