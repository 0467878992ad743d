/**
 * What may happen at any stage: holds, notes, and the lead ending the session.
 */
import { activeLineSet } from '../state';
import { lineSetLabel } from '../words';
import { alreadyDone, lineSetRef, refuse, type RulesFor } from './common';

export const ANYTIME_RULES: RulesFor<'call-hold' | 'ack-hold' | 'release-hold' | 'note' | 'end'> = {
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
      // Not while loaders handle steel: the log would stop with a set half loaded. Hold first, finish, then end.
      const working = activeLineSet(state);
      if (working && (working.stage === 'rail-clear-called' || working.stage === 'rail-clear')) {
        return {
          ok: false,
          code: 'refused',
          reason: `The loaders are working on ${lineSetLabel(working.name)}: they call "loading complete" first (call a hold to stop them now).`,
          lineSetId: working.id,
        };
      }
      state.phase = 'finished';
      state.endedAtMs = nowMs;
      state.endedHow = 'ended';
      state.endReason = action.reason;
      return {
        ok: true,
        entries: [
          {
            kind: 'ended',
            details: {
              reason: action.reason,
              untested: state.lineSets.filter((l) => l.stage !== 'tested').map((l) => l.name),
              flagged: state.lineSets.filter((l) => l.flagged).map((l) => l.name),
            },
          },
        ],
      };
    },
  },
};
