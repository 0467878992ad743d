/**
 * Moving a set to its loading position: the rail calls it, the crew answers "clear", the rail locks it;
 * Railcall re-alerts whoever stays silent.
 */
import { activeLineSet, mustAnswerClear, notYetClear, participantOf } from '../state';
import { PROXY_VIA_WORDS, capital, lineSetDuty, lineSetLabel, nameList, sessionDuty } from '../words';
import { alreadyDone, first, isRefusal, lineSetRef, needActive, pastStage, refuse, wrongStage, type RulesFor } from './common';

export const MOVE_RULES: RulesFor<'call-move' | 'answer-clear' | 'record-clear-for' | 'confirm-locked' | 're-alert'> = {
  'call-move': {
    who: 'lead',
    atRail: true,
    apply({ state, me, nowMs }) {
      if (state.phase === 'gathering') return refuse(first(sessionDuty(state)));
      const current = activeLineSet(state);
      if (current && current.stage !== 'tested') {
        return current.stage === 'move-called'
          ? alreadyDone(`${capital(lineSetLabel(current.name))} has already been called.`, { lineSetId: current.id })
          : refuse(first(lineSetDuty(state, current)), { lineSetId: current.id });
      }
      const nextIndex = state.lineSets.findIndex((l) => l.stage === 'waiting');
      if (nextIndex < 0) return alreadyDone('Every line set in this session has been called.');
      // A tie-off is never left unattended: the rail operator stays with a tied set until it is corrected.
      const tied = state.lineSets.find((l) => l.tiedOff);
      if (tied) {
        return refuse(`${capital(lineSetLabel(tied.name))} is tied off out of balance: correct it and record a balanced test before calling another set (a tie-off is never left unattended).`, { lineSetId: tied.id });
      }
      const ls = state.lineSets[nextIndex];
      state.activeIndex = nextIndex;
      ls.stage = 'move-called';
      ls.call = { calledAtMs: nowMs, byPersonId: me.personId, answers: [], alerts: [] };
      const mustAnswer = notYetClear(state).map((p) => p.name);
      return {
        ok: true,
        entries: [{ kind: 'move-called', lineSetId: ls.id, details: { ...lineSetRef(ls), direction: 'in', mustAnswer } }],
      };
    },
  },

  'answer-clear': {
    who: ['deck', 'loader'],
    atRail: false,
    apply({ state, me, nowMs }) {
      const ls = activeLineSet(state);
      if (ls && ls.stage !== 'tested' && pastStage(ls, 'move-called')) {
        return alreadyDone(`${capital(lineSetLabel(ls.name))} is already in position and locked.`, { lineSetId: ls.id });
      }
      if (!ls || ls.stage !== 'move-called' || !ls.call) {
        return refuse('No move has been called: there is nothing to answer yet.');
      }
      if (ls.call.answers.some((a) => a.personId === me.personId)) {
        return alreadyDone(`You have already answered "clear" for ${lineSetLabel(ls.name)}.`, { lineSetId: ls.id });
      }
      ls.call.answers.push({ personId: me.personId, name: me.name, atMs: nowMs });
      const stillWaitingOn = notYetClear(state).map((p) => p.name);
      return {
        ok: true,
        entries: [{ kind: 'clear-answered', lineSetId: ls.id, details: { ...lineSetRef(ls), stillWaitingOn } }],
      };
    },
  },

  /**
   * A phone died or went unheard: after Railcall has re-alerted a silent person, the lead may record
   * their "clear" as heard another way (by voice, over the radio, seen standing clear). Never silently:
   * the log names the lead who recorded it and the person it was recorded for.
   */
  'record-clear-for': {
    who: 'lead',
    atRail: true,
    apply({ state, action, me, nowMs }) {
      const ls = activeLineSet(state);
      if (!ls || ls.stage !== 'move-called' || !ls.call) {
        return refuse('No move call is waiting for answers: there is no "clear" to record.', ls ? { lineSetId: ls.id } : {});
      }
      const person = participantOf(state, action.personId);
      if (!person) return refuse('That person has not joined the session: only a joined crew member\'s "clear" can be recorded.', { lineSetId: ls.id });
      if (!mustAnswerClear(state).some((p) => p.personId === person.personId)) {
        return refuse(`${person.name} does not answer move calls: only the deck crew and loaders answer "clear".`, { lineSetId: ls.id });
      }
      const answer = ls.call.answers.find((a) => a.personId === person.personId);
      if (answer) {
        const how = answer.recordedBy ? ` (recorded by ${answer.recordedBy.name})` : '';
        return alreadyDone(`${person.name} has already answered "clear" for ${lineSetLabel(ls.name)}${how}.`, { lineSetId: ls.id });
      }
      const alert = ls.call.alerts.find((a) => a.personId === person.personId);
      if (!alert || alert.count < 1) {
        return refuse(
          `Railcall has not re-alerted ${person.name} yet: wait for their own answer. Once they have been alerted again, you may record a "clear" you heard from them.`,
          { lineSetId: ls.id },
        );
      }
      ls.call.answers.push({
        personId: person.personId,
        name: person.name,
        atMs: nowMs,
        recordedBy: { personId: me.personId, name: me.name, via: action.via },
      });
      const stillWaitingOn = notYetClear(state).map((p) => p.name);
      return {
        ok: true,
        entries: [
          {
            kind: 'clear-recorded-for',
            lineSetId: ls.id,
            details: {
              ...lineSetRef(ls),
              forPersonId: person.personId,
              forName: person.name,
              forRole: person.role,
              byPersonId: me.personId,
              byName: me.name,
              via: action.via,
              viaText: PROXY_VIA_WORDS[action.via],
              reAlerts: alert.count,
              stillWaitingOn,
            },
          },
        ],
      };
    },
  },

  'confirm-locked': {
    who: 'lead',
    atRail: true,
    apply({ state, nowMs }) {
      const ls = needActive(state);
      if (isRefusal(ls)) return ls;
      if (ls.stage !== 'move-called') {
        return wrongStage(state, ls, pastStage(ls, 'move-called'), `${capital(lineSetLabel(ls.name))} is already in position and locked.`);
      }
      const silent = notYetClear(state);
      if (silent.length) {
        return refuse(
          `Waiting for "clear" from ${nameList(silent.map((p) => p.name))}: nothing proceeds without their answers.`,
          { lineSetId: ls.id },
        );
      }
      ls.stage = 'in-position';
      ls.lockedAtMs = nowMs;
      return {
        ok: true,
        entries: [{ kind: 'locked', lineSetId: ls.id, details: { ...lineSetRef(ls), answeredBy: ls.call?.answers.map((a) => a.name) ?? [] } }],
      };
    },
  },

  're-alert': {
    who: 'system',
    atRail: false,
    apply({ state, action, nowMs }) {
      const ls = activeLineSet(state);
      if (!ls?.call || ls.stage !== 'move-called') return alreadyDone('No move call is waiting for answers.');
      const silent = notYetClear(state).filter((p) => action.personIds.includes(p.personId));
      if (!silent.length) return alreadyDone('Everyone named has answered "clear".', { lineSetId: ls.id });
      for (const p of silent) {
        const alert = ls.call.alerts.find((a) => a.personId === p.personId);
        if (alert) {
          alert.count += 1;
          alert.lastMs = nowMs;
        } else {
          ls.call.alerts.push({ personId: p.personId, count: 1, lastMs: nowMs });
        }
      }
      return {
        ok: true,
        entries: [
          {
            kind: 're-alerted',
            lineSetId: ls.id,
            details: { ...lineSetRef(ls), people: silent.map((p) => ({ personId: p.personId, name: p.name })), silentSinceMs: ls.call.calledAtMs },
          },
        ],
      };
    },
  },
};
