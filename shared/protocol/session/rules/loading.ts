/**
 * Loading with the set in position: tie-off when needed, the rail cleared, each step confirmed in
 * order, "loading complete", and untying.
 */
import { applyStep, loadImbalanceKg } from '../../../rigging';
import { isTestOnly, isWorkStep, nextWorkStepIndex } from '../state';
import { capital, lineSetDuty, lineSetLabel, stepDuty, stepRole, stepText } from '../words';
import { alreadyDone, first, forbid, isRefusal, lineSetRef, markDone, needActive, pastStage, refuse, wrongStage, type RulesFor } from './common';

export const LOADING_RULES: RulesFor<'confirm-tie-off' | 'call-clear-rail' | 'confirm-rail-clear' | 'confirm-step' | 'call-loading-complete' | 'confirm-untie'> = {
  'confirm-tie-off': {
    who: 'lead',
    atRail: true,
    apply({ state }) {
      const ls = needActive(state);
      if (isRefusal(ls)) return ls;
      if (!ls.needsTieOff) return refuse(`The plan for ${lineSetLabel(ls.name)} needs no tie-off.`, { lineSetId: ls.id });
      if (ls.tiedOff || pastStage(ls, 'in-position')) {
        return alreadyDone(`${capital(lineSetLabel(ls.name))} has already been tied off.`, { lineSetId: ls.id });
      }
      if (ls.stage !== 'in-position') return refuse(first(lineSetDuty(state, ls)), { lineSetId: ls.id });
      ls.tiedOff = true;
      markDone(ls, 'tie-off');
      return { ok: true, entries: [{ kind: 'tied-off', lineSetId: ls.id, details: lineSetRef(ls) }] };
    },
  },

  'call-clear-rail': {
    who: ['loader'],
    atRail: false,
    apply({ state }) {
      const ls = needActive(state);
      if (isRefusal(ls)) return ls;
      if (ls.stage !== 'in-position' || (ls.needsTieOff && !ls.tiedOff)) {
        return wrongStage(state, ls, pastStage(ls, 'in-position'), 'The rail has already been called clear.');
      }
      if (isTestOnly(ls)) return refuse(`${capital(lineSetLabel(ls.name))} is a test only: nothing is loaded, so the rail is not cleared.`, { lineSetId: ls.id });
      ls.stage = 'rail-clear-called';
      return { ok: true, entries: [{ kind: 'rail-clear-called', lineSetId: ls.id, details: lineSetRef(ls) }] };
    },
  },

  'confirm-rail-clear': {
    // Not `atRail`: confirming it is the step away from the rail (and a repeat is "already done").
    who: 'lead',
    atRail: false,
    apply({ state, nowMs }) {
      const ls = needActive(state);
      if (isRefusal(ls)) return ls;
      if (ls.stage !== 'rail-clear-called') {
        return wrongStage(state, ls, pastStage(ls, 'rail-clear-called'), 'The rail is already clear.');
      }
      ls.stage = 'rail-clear';
      ls.railClearAtMs = nowMs;
      return {
        ok: true,
        // At least 10 ft from the rail and out from under the gallery, keeping watch (common practice).
        entries: [{ kind: 'rail-clear-confirmed', lineSetId: ls.id, details: { ...lineSetRef(ls), distanceFt: 10 } }],
      };
    },
  },

  'confirm-step': {
    who: ['loader', 'deck'],
    atRail: false,
    apply({ state, action, me }) {
      const ls = needActive(state);
      if (isRefusal(ls)) return ls;
      const i = action.stepIndex;
      const at = { lineSetId: ls.id, stepIndex: i };
      const step = ls.steps[i];
      if (!step) return refuse(`${capital(lineSetLabel(ls.name))} has no step ${i + 1}.`, at);
      if (!isWorkStep(step)) {
        return refuse(`Step ${i + 1} (${stepText(ls, i)}) is the rail operator's, not a loading step.`, at);
      }
      if (ls.done[i]) return alreadyDone(`Step ${i + 1} is already done: ${stepText(ls, i, 'done')}.`, at);
      if (ls.stage !== 'rail-clear') return refuse(first(lineSetDuty(state, ls)), at);
      const role = stepRole(step);
      if (me.role !== role) {
        return forbid(`${capital(stepText(ls, i))} is confirmed by ${role === 'loader' ? 'a loader' : 'the deck crew'}.`);
      }
      const next = nextWorkStepIndex(ls);
      if (i !== next) return refuse(first(stepDuty(ls, next)), at);
      ls.load = applyStep(ls.load, step, ls.brickTypes);
      const beforeKg = ls.imbalanceKg;
      ls.imbalanceKg = loadImbalanceKg(ls.load, ls.brickTypes);
      // The measured figure moves with the step by the same amount as the computed one.
      if (ls.measuredKg !== undefined) ls.measuredKg += ls.imbalanceKg - beforeKg;
      // Bricks pulled from the arbor land on the loading bridge; bricks loaded come from it.
      if (state.bridgeStock && step.bricks && (step.kind === 'remove-bricks' || step.kind === 'add-bricks')) {
        const sign = step.kind === 'remove-bricks' ? 1 : -1;
        for (const [type, n] of Object.entries(step.bricks)) state.bridgeStock[type] = Math.max(0, (state.bridgeStock[type] ?? 0) + sign * n);
      }
      ls.done[i] = true;
      return {
        ok: true,
        entries: [
          {
            kind: 'step-confirmed',
            lineSetId: ls.id,
            stepIndex: i,
            details: {
              ...lineSetRef(ls),
              step: structuredClone(step),
              text: stepText(ls, i, 'done'),
              imbalanceKg: ls.imbalanceKg,
              plannedImbalanceKg: step.imbalanceAfterKg,
              ...(ls.measuredKg !== undefined ? { measuredImbalanceKg: ls.measuredKg } : {}),
              bricksOnArbor: { ...ls.load.bricks },
              piecesOnBatten: ls.load.pieces.map((p) => p.id),
            },
          },
        ],
      };
    },
  },

  'call-loading-complete': {
    who: ['loader'],
    atRail: false,
    apply({ state, nowMs }) {
      const ls = needActive(state);
      if (isRefusal(ls)) return ls;
      if (ls.stage !== 'rail-clear' || nextWorkStepIndex(ls) >= 0) {
        return wrongStage(state, ls, pastStage(ls, 'rail-clear'), `Loading complete has already been called on ${lineSetLabel(ls.name)}.`);
      }
      ls.stage = 'loading-complete';
      ls.loadingCompleteAtMs = nowMs;
      return {
        ok: true,
        entries: [{ kind: 'loading-complete', lineSetId: ls.id, details: { ...lineSetRef(ls), imbalanceKg: ls.imbalanceKg } }],
      };
    },
  },

  'confirm-untie': {
    who: 'lead',
    atRail: true,
    apply({ state }) {
      const ls = needActive(state);
      if (isRefusal(ls)) return ls;
      if (!ls.needsTieOff) return refuse(`${capital(lineSetLabel(ls.name))} was not tied off.`, { lineSetId: ls.id });
      if (ls.stage !== 'loading-complete' || !ls.tiedOff) {
        return wrongStage(state, ls, pastStage(ls, 'loading-complete') || (ls.stage === 'loading-complete' && !ls.tiedOff), `${capital(lineSetLabel(ls.name))} is already untied.`);
      }
      ls.tiedOff = false;
      markDone(ls, 'untie');
      return { ok: true, entries: [{ kind: 'untied', lineSetId: ls.id, details: lineSetRef(ls) }] };
    },
  },
};
