import { describe, expect, it } from 'vitest';
import { stepText, type LineSetState } from '@shared/protocol/session';
import type { PlanStep } from '@shared/rigging';

/** The little of a line set's state that its sentences read. */
function lineSet(steps: PlanStep[]): LineSetState {
  return { name: '12', steps, brickTypes: [{ type: 'full', massKg: 9 }], pieceNames: { flat: 'Lamp room flat' } } as unknown as LineSetState;
}

describe('log sentences name the spreader plates of a brick step', () => {
  it('says after which bricks the plates go on when loading', () => {
    const ls = lineSet([
      { kind: 'add-piece', pieceId: 'flat', massKg: 200, imbalanceAfterKg: 200 },
      { kind: 'add-bricks', pieceId: 'flat', bricks: { full: 45 }, spreaderPlatesAt: [12, 24, 36], imbalanceAfterKg: 0 },
    ]);
    expect(stepText(ls, 1)).toBe('load 45 bricks for Lamp room flat, placing 3 spreader plates after bricks 12, 24 and 36');
    expect(stepText(ls, 1, 'done')).toBe('loaded 45 bricks for Lamp room flat, placing 3 spreader plates after bricks 12, 24 and 36');
  });

  it('says before which brick a plate comes off when unloading, and nothing when no plate is passed', () => {
    const ls = lineSet([
      { kind: 'remove-bricks', pieceId: 'flat', bricks: { full: 10 }, spreaderPlatesAt: [6], imbalanceAfterKg: 90 },
      { kind: 'remove-piece', pieceId: 'flat', imbalanceAfterKg: 0 },
      { kind: 'remove-bricks', bricks: { full: 2 }, imbalanceAfterKg: 0 },
    ]);
    // The plate at the 6 count comes off before the 7th brick is pulled.
    expect(stepText(ls, 0)).toBe('pull 10 bricks for Lamp room flat, taking off a spreader plate before brick 7');
    expect(stepText(ls, 2)).not.toMatch(/spreader/);
  });
});
