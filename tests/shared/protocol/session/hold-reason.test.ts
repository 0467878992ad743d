import { describe, expect, it } from 'vitest';
import { allowedActions, describeEntry, holdNotAcknowledged, QUICK_HOLD_REASONS } from '@shared/protocol/session';
import { actionOfEntry } from '@shared/protocol/replay';
import { Session, alex, jo, kit, robin, sam } from './fixtures';

describe('a hold: one tap stops everything, its caller says why after, the rail sees who has not acknowledged', () => {
  it('takes the reason from the one who called the hold, during the hold, and every state carries it', () => {
    const s = new Session().joinCrew();
    s.do(jo, { type: 'begin' });
    s.do(kit, { type: 'call-hold' });
    expect(s.state.hold?.reason).toBeNull();
    expect(allowedActions(s.state, kit.personId)).toContain('give-hold-reason');
    expect(allowedActions(s.state, sam.personId)).not.toContain('give-hold-reason');
    expect(s.refused(sam, { type: 'give-hold-reason', reason: 'Mine' })).toMatchObject({ code: 'forbidden', reason: 'Only Kit Harrow, who called the hold, says why it was called.' });

    const d = s.do(kit, { type: 'give-hold-reason', reason: QUICK_HOLD_REASONS[0] });
    expect(s.state.hold?.reason).toBe('Someone under the gallery');
    expect(d.entries[0]).toMatchObject({ kind: 'hold-reason-given', role: 'stage-manager', details: { reason: 'Someone under the gallery', before: null } });
    expect(describeEntry({ ...d.entries[0], personName: 'Kit Harrow' })).toBe('Kit Harrow said why the hold was called: "Someone under the gallery".');
    expect(actionOfEntry({ ...d.entries[0], seq: 9, serverTimeMs: 0, clientTimeMs: 0, personId: kit.personId, personName: kit.name, role: 'stage-manager', lineSetId: null, stepIndex: null, hash: '', prevHash: '' }))
      .toEqual({ type: 'give-hold-reason', reason: 'Someone under the gallery' });

    // Words after the quick choice replace it; the same words again are already given.
    s.do(kit, { type: 'give-hold-reason', reason: 'Someone under the gallery, stage left' });
    expect(s.refused(kit, { type: 'give-hold-reason', reason: 'Someone under the gallery, stage left' }).code).toBe('already-done');
    s.do(jo, { type: 'release-hold' });
    expect(s.refused(kit, { type: 'give-hold-reason', reason: 'Late' }).reason).toBe('No hold is on.');
  });

  it('names who has not yet acknowledged, leaving out the caller and the lead who releases it', () => {
    const s = new Session().joinCrew();
    s.do(sam, { type: 'call-hold', reason: 'Brick not seated in the arbor' });
    expect(holdNotAcknowledged(s.state).map((p) => p.name)).toEqual(['Alex Tamsin', 'Robin Ashby', 'Kit Harrow']);
    s.do(robin, { type: 'ack-hold' });
    expect(holdNotAcknowledged(s.state).map((p) => p.name)).toEqual(['Alex Tamsin', 'Kit Harrow']);
    s.do(alex, { type: 'ack-hold' });
    s.do(kit, { type: 'ack-hold' });
    expect(holdNotAcknowledged(s.state)).toEqual([]);
    s.do(jo, { type: 'release-hold' });
    expect(holdNotAcknowledged(s.state)).toEqual([]);
  });
});
