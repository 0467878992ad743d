import { describe, expect, it } from 'vitest';
import { applyStep, loadImbalanceKg, type BrickType, type LineSetLoad } from '@shared/rigging';

const brickTypes: BrickType[] = [
  { type: 'full', massKg: 9 },
  { type: 'half', massKg: 4.5 },
];
const load: LineSetLoad = {
  purchase: 1,
  pipeKg: 30,
  arborKg: 30,
  pieces: [{ id: 'drape', massKg: 18 }],
  bricks: { full: 2 },
};

describe('loadImbalanceKg', () => {
  it('is batten side minus arbor side over purchase (balance is judged at the batten: the common trade definition)', () => {
    expect(loadImbalanceKg(load, brickTypes)).toBe(0);
    expect(loadImbalanceKg({ ...load, bricks: { full: 1 } }, brickTypes)).toBe(9);
  });

  it('halves the arbor side on double purchase (stage rigging handbooks: 2:1 double purchase)', () => {
    // 300 lb on the batten needs 600 lb on the arbor: here 48 kg batten side, 96 kg arbor side.
    const double: LineSetLoad = { ...load, purchase: 2, arborKg: 60, bricks: { full: 4 } };
    expect(loadImbalanceKg(double, brickTypes)).toBe(0);
  });
});

describe('applyStep', () => {
  it('removes and adds bricks without changing the input', () => {
    const after = applyStep(load, { kind: 'remove-bricks', bricks: { full: 2 }, imbalanceAfterKg: 18 }, brickTypes);
    expect(after.bricks.full).toBe(0);
    expect(load.bricks.full).toBe(2);
    const back = applyStep(after, { kind: 'add-bricks', bricks: { full: 1, half: 2 }, imbalanceAfterKg: 0 }, brickTypes);
    expect(back.bricks).toEqual({ full: 1, half: 2 });
  });

  it('removes a piece by id and appends an added piece', () => {
    const off = applyStep(load, { kind: 'remove-piece', pieceId: 'drape', imbalanceAfterKg: -18 }, brickTypes);
    expect(off.pieces).toEqual([]);
    const on = applyStep(off, { kind: 'add-piece', pieceId: 'truss', massKg: 40, imbalanceAfterKg: 22 }, brickTypes);
    expect(on.pieces).toEqual([{ id: 'truss', massKg: 40 }]);
  });

  it('changes nothing on tie-off, untie and test-balance', () => {
    for (const kind of ['tie-off', 'untie', 'test-balance'] as const) {
      expect(applyStep(load, { kind, imbalanceAfterKg: 0 }, brickTypes)).toEqual(load);
    }
  });

  it('refuses impossible steps with a clear error', () => {
    expect(() => applyStep(load, { kind: 'remove-bricks', bricks: { full: 3 }, imbalanceAfterKg: 0 }, brickTypes))
      .toThrow(/only 2 on the arbor/);
    expect(() => applyStep(load, { kind: 'remove-piece', pieceId: 'nope', imbalanceAfterKg: 0 }, brickTypes))
      .toThrow(/not on the batten/);
    expect(() => applyStep(load, { kind: 'add-piece', pieceId: 'drape', massKg: 1, imbalanceAfterKg: 0 }, brickTypes))
      .toThrow(/already on the batten/);
    expect(() => applyStep(load, { kind: 'add-piece', pieceId: 'x', imbalanceAfterKg: 0 }, brickTypes))
      .toThrow(/needs the piece's mass/);
    expect(() => applyStep(load, { kind: 'add-bricks', bricks: { brass: 1 }, imbalanceAfterKg: 0 }, brickTypes))
      .toThrow(/Unknown brick type/);
  });
});
