import { describe, expect, it } from 'vitest';
import { lbToKg, type BrickType, type PlanStep } from '@shared/rigging';
import { brickStepWords, spreaderPlateWords, stepWords } from '@/utils/sessionText';

const full: BrickType = { type: 'full', massKg: lbToKg(20), heightM: 0.0508 };
const half: BrickType = { type: 'half', massKg: lbToKg(10), heightM: 0.0254 };

describe('spreader plate words', () => {
  it('names where the plate goes in the loader\'s big line and the plan step list', () => {
    const step: PlanStep = { kind: 'add-bricks', pieceId: 'p1', bricks: { full: 45 }, spreaderPlatesAt: [24], imbalanceAfterKg: 0 };
    expect(brickStepWords(step, [full], 'imperial')).toBe('Load 45 bricks, 20 lb each: 24, place a spreader plate, then 21 more');
    expect(stepWords(step, [full], 'imperial', { p1: 'Lamp room flat' }))
      .toBe('Load 45 bricks, 20 lb each for Lamp room flat: 24, place a spreader plate, then 21 more');
  });

  it('names every plate of a long step, and one that goes on after the last brick', () => {
    const step: PlanStep = { kind: 'add-bricks', bricks: { full: 45 }, spreaderPlatesAt: [12, 24, 36], imbalanceAfterKg: 0 };
    expect(spreaderPlateWords(step, [full]))
      .toBe('12, place a spreader plate, 12 more, place a spreader plate, 12 more, place a spreader plate, then 9 more');
    expect(spreaderPlateWords({ ...step, bricks: { full: 12 }, spreaderPlatesAt: [12] }, [full])).toBe('12, then place a spreader plate');
  });

  it('says when a removal takes a plate off, before or among its bricks', () => {
    const pull: PlanStep = { kind: 'remove-bricks', bricks: { full: 10 }, spreaderPlatesAt: [6], imbalanceAfterKg: 0 };
    expect(brickStepWords(pull, [full], 'imperial')).toBe('Pull 10 bricks, 20 lb each: 6, take off a spreader plate, then 4 more');
    expect(spreaderPlateWords({ ...pull, spreaderPlatesAt: [0] }, [full])).toBe('take off a spreader plate, then pull 10');
  });

  it('counts by type when the venue has several brick types', () => {
    const step: PlanStep = { kind: 'add-bricks', bricks: { full: 10, half: 4 }, spreaderPlatesAt: [9], imbalanceAfterKg: 0 };
    expect(spreaderPlateWords(step, [full, half])).toBe('9 full, place a spreader plate, then 1 full and 4 half more');
  });

  it('adds nothing to a step that passes no plate', () => {
    const step: PlanStep = { kind: 'add-bricks', bricks: { full: 4 }, imbalanceAfterKg: 0 };
    expect(brickStepWords(step, [full], 'imperial')).toBe('Load 4 bricks, 20 lb each');
  });
});
