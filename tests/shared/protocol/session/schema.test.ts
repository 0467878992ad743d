import { describe, expect, it } from 'vitest';
import { ACTION_TYPES, actionEnvelopeSchema, sessionActionSchema, systemActionSchema } from '@shared/protocol/session';

const envelope = (action: unknown) => ({ key: 'a1b2c3d4-e5', clientTimeMs: 1_700_000_000_000, action });

describe('sessionActionSchema', () => {
  it('lists every action type a phone sends, in kebab-case', () => {
    expect(ACTION_TYPES).toEqual([
      'join', 'leave', 'begin', 'call-move', 'answer-clear', 'record-clear-for', 'confirm-locked', 'confirm-tie-off', 'call-clear-rail',
      'confirm-rail-clear', 'confirm-step', 'call-loading-complete', 'confirm-untie', 'record-test', 'plan-correction', 'call-hold',
      'give-hold-reason', 'ack-hold', 'release-hold', 'note', 'end',
    ]);
  });

  it('accepts well-formed actions and strips unknown keys', () => {
    expect(sessionActionSchema.parse({ type: 'confirm-step', stepIndex: 3, extra: 1 })).toEqual({ type: 'confirm-step', stepIndex: 3 });
    expect(sessionActionSchema.parse({ type: 'note', text: '  Heads up  ' })).toEqual({ type: 'note', text: 'Heads up' });
  });

  it('refuses what is out of bounds', () => {
    const bad = [
      { type: 'join', role: 'admin' },
      { type: 'confirm-step', stepIndex: -1 },
      { type: 'confirm-step', stepIndex: 1.5 },
      { type: 'confirm-step', stepIndex: 500 },
      { type: 'note', text: '   ' },
      { type: 'note', text: 'x'.repeat(1001) },
      { type: 'end' },
      { type: 'call-hold', reason: 'x'.repeat(501) },
      { type: 'record-test', result: 'pipe-heavy' },
      { type: 'record-test', result: 'arbor-heavy', estimateKg: 0 },
      { type: 'record-test', result: 'pipe-heavy', estimateKg: 2001 },
      { type: 'record-test', result: 'wobbly' },
      { type: 're-alert', personIds: [1] },
      { type: 'teleport' },
    ];
    for (const action of bad) expect(sessionActionSchema.safeParse(action).success, JSON.stringify(action)).toBe(false);
  });

  it('keeps re-alert for the server alone', () => {
    expect(systemActionSchema.parse({ type: 're-alert', personIds: [2] })).toEqual({ type: 're-alert', personIds: [2] });
    expect(actionEnvelopeSchema.safeParse(envelope({ type: 're-alert', personIds: [2] })).success).toBe(false);
  });
});

describe('actionEnvelopeSchema', () => {
  it('needs an idempotency key of 8 to 64 safe characters and a whole-ms client time', () => {
    expect(actionEnvelopeSchema.safeParse(envelope({ type: 'leave' })).success).toBe(true);
    expect(actionEnvelopeSchema.safeParse({ ...envelope({ type: 'leave' }), key: 'short' }).success).toBe(false);
    expect(actionEnvelopeSchema.safeParse({ ...envelope({ type: 'leave' }), key: 'k'.repeat(65) }).success).toBe(false);
    expect(actionEnvelopeSchema.safeParse({ ...envelope({ type: 'leave' }), key: 'has space in it' }).success).toBe(false);
    expect(actionEnvelopeSchema.safeParse({ ...envelope({ type: 'leave' }), clientTimeMs: -1 }).success).toBe(false);
    expect(actionEnvelopeSchema.safeParse({ ...envelope({ type: 'leave' }), clientTimeMs: Number.NaN }).success).toBe(false);
  });
});
