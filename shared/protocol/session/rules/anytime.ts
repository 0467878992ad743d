/**
 * What may happen at any stage: holds, notes, and the lead ending the session.
 */
import { activeLineSet } from '../state';
import { lineSetOutcome } from '../words';
import { alreadyDone, forbid, lineSetRef, refuse, type RulesFor } from './common';

export const ANYTIME_RULES: RulesFor<'call-hold' | 'give-hold-reason' | 'ack-hold' | 'release-hold' | 'note' | 'end'> = {
  'call-hold': {
    who: 'joined',
    atRail: false,
    apply({ state, action, me, nowMs }) {
      // A second hold while one is on never reaches here: the hold check refuses it first.
      state.hold = {
        byPersonId: me.personId,
        byName: me.name,
        reason: action.reason ?? null,
        atMs: nowMs,
        acks: [{ personId: me.personId, name: me.name, atMs: nowMs }],
      };
      const ls = activeLineSet(state);
      return {
        ok: true,
        entries: [{ kind: 'hold-called', ...(ls ? { lineSetId: ls.id } : {}), details: { reason: state.hold.reason, ...(ls ? lineSetRef(ls) : {}) } }],
      };
    },
  },

  /** HOLD stops everything at one tap; its caller says why afterwards (and may say it again in more words). */
  'give-hold-reason': {
    who: 'joined',
    atRail: false,
    apply({ state, action, me }) {
      if (!state.hold) return refuse('No hold is on.');
      if (state.hold.byPersonId !== me.personId) return forbid(`Only ${state.hold.byName}, who called the hold, says why it was called.`);
      if (!action.reason?.trim()) return refuse('Say in a few words why the hold was called.');
      if (state.hold.reason === action.reason) return alreadyDone('That reason is already given.');
      const before = state.hold.reason;
      state.hold.reason = action.reason;
      const ls = activeLineSet(state);
      return {
        ok: true,
        entries: [{ kind: 'hold-reason-given', ...(ls ? { lineSetId: ls.id } : {}), details: { reason: action.reason, before, ...(ls ? lineSetRef(ls) : {}) } }],
      };
    },
  },

  'ack-hold': {
    who: 'joined',
    atRail: false,
    apply({ state, me, nowMs }) {
      if (!state.hold) return refuse('No hold is on.');
      if (state.hold.acks.some((a) => a.personId === me.personId)) return alreadyDone('You have already acknowledged the hold.');
      state.hold.acks.push({ personId: me.personId, name: me.name, atMs: nowMs });
      return { ok: true, entries: [{ kind: 'hold-acknowledged', details: { holdBy: state.hold.byName } }] };
    },
  },

  'release-hold': {
    who: 'lead',
    atRail: false,
    apply({ state, nowMs }) {
      if (!state.hold) return alreadyDone('No hold is on.');
      const hold = state.hold;
      state.hold = null;
      state.lastHoldReleasedAtMs = nowMs;
      return {
        ok: true,
        entries: [
          {
            kind: 'hold-released',
            details: { holdBy: hold.byName, reason: hold.reason, heldForMs: nowMs - hold.atMs, acknowledgedBy: hold.acks.map((a) => a.name) },
          },
        ],
      };
    },
  },

  note: {
    who: 'joined',
    atRail: false,
    apply({ state, action }) {
      const ls = activeLineSet(state);
      return { ok: true, entries: [{ kind: 'note', ...(ls ? { lineSetId: ls.id } : {}), details: { text: action.text } }] };
    },
  },

  end: {
    who: 'lead',
    atRail: false,
    apply({ state, action, nowMs }) {
      // At any moment, also while loaders work or a hold is on: what each set was left in goes into the log,
      // and the server writes back and flags every set worked but not tested.
      state.phase = 'finished';
      state.endedAtMs = nowMs;
      state.endedHow = 'ended';
      state.endReason = action.reason;
      state.hold = null;
      // Worked but not tested: nobody checked its balance, so it is flagged like a set found out of balance.
      for (const l of state.lineSets) if (l.stage !== 'tested' && l.done.some(Boolean)) l.flagged = true;
      return {
        ok: true,
        entries: [
          {
            kind: 'ended',
            details: {
              reason: action.reason,
              untested: state.lineSets.filter((l) => l.stage !== 'tested').map((l) => l.name),
              flagged: state.lineSets.filter((l) => l.flagged).map((l) => l.name),
              leftAs: state.lineSets.map((l) => ({ lineSetId: l.id, name: l.name, outcome: lineSetOutcome(l) })),
            },
          },
        ],
      };
    },
  },
};
