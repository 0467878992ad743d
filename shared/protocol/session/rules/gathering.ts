/**
 * Before loading: joining, leaving, and the lead beginning with the crew there.
 */
import { ROLE_LABELS } from '../../roles';
import { crewShortfall, missingStepRoles, participantOf } from '../state';
import { missingStepRolesText, shortText } from '../words';
import { alreadyDone, forbid, refuse, type RulesFor } from './common';

export const GATHERING_RULES: RulesFor<'join' | 'leave' | 'begin'> = {
  join: {
    who: 'anyone',
    atRail: false,
    apply({ state, action, actor, nowMs }) {
      const existing = participantOf(state, actor.personId);
      if (existing?.role === action.role) return alreadyDone(`You have already joined as ${ROLE_LABELS[action.role].toLowerCase()}.`);
      if (existing) {
        return refuse(`You joined as ${ROLE_LABELS[existing.role].toLowerCase()}: leave the session first to join as ${ROLE_LABELS[action.role].toLowerCase()}.`);
      }
      if (!actor.venueRoles.includes(action.role)) {
        return forbid(`You do not hold the ${ROLE_LABELS[action.role].toLowerCase()} role at this venue.`);
      }
      state.participants.push({ personId: actor.personId, name: actor.name, role: action.role, joinedAtMs: nowMs });
      const leads = action.role === 'rail' && state.leadPersonId === null;
      if (leads) state.leadPersonId = actor.personId;
      return { ok: true, entries: [{ kind: 'joined', role: action.role, details: { lead: leads } }] };
    },
  },

  leave: {
    who: 'joined',
    atRail: false,
    apply({ state, me }) {
      const isLead = state.leadPersonId === me.personId;
      if (isLead && state.phase === 'loading') {
        return refuse('The lead cannot leave while loading is under way: end the session with a reason first.');
      }
      state.participants = state.participants.filter((p) => p.personId !== me.personId);
      // A person who comes back must answer the open move call again.
      for (const ls of state.lineSets) {
        if (ls.call) ls.call.answers = ls.call.answers.filter((a) => a.personId !== me.personId);
      }
      const details: Record<string, unknown> = {};
      if (isLead) {
        const next = state.participants.find((p) => p.role === 'rail') ?? null;
        state.leadPersonId = next?.personId ?? null;
        details.newLeadPersonId = next?.personId ?? null;
        details.newLeadName = next?.name ?? null;
      }
      return { ok: true, entries: [{ kind: 'left', details }] };
    },
  },

  begin: {
    who: 'lead',
    atRail: false,
    apply({ state, action, nowMs }) {
      if (state.phase !== 'gathering') return alreadyDone('Loading has already begun.');
      // A reason to begin short never covers a step nobody joined can do: the crew would wait on it forever.
      const missing = missingStepRoles(state);
      if (missing.length) return refuse(missingStepRolesText(missing));
      const short = crewShortfall(state);
      if (short.length && !action.shortCrewReason) {
        return refuse(`The minimum crew has not joined (${shortText(short)}): wait for them, or give a reason to begin short.`);
      }
      state.phase = 'loading';
      state.beganAtMs = nowMs;
      state.shortCrewReason = short.length ? (action.shortCrewReason ?? null) : null;
      const crew = { rail: 0, loader: 0, deck: 0, 'stage-manager': 0 };
      for (const p of state.participants) crew[p.role] += 1;
      return {
        ok: true,
        entries: [{ kind: 'began', details: { crew, short, shortCrewReason: state.shortCrewReason } }],
      };
    },
  },
};
