/**
 * The rail operator's test of balance after loading; the correction worked out from a test out of
 * balance, run as steps of its own (clear the rail, bricks, loading complete, untie) and a new test.
 * A tested set is never tested again except after its correction.
 */
import { correctionSteps, formatMass } from '../../../rigging';
import { activeLineSet, isTestOnly, sessionUnits } from '../state';
import { balanceText, capital, lineSetDuty, lineSetLabel } from '../words';
import { alreadyDone, finishIfComplete, first, isRefusal, lineSetRef, markDone, needActive, refuse, type LogDraft, type RulesFor } from './common';

/** The last test's figure as a signed imbalance: positive = pipe-heavy. */
const signedEstimate = (result: string, estimateKg: number | null) => (result === 'balanced' ? 0 : result === 'pipe-heavy' ? (estimateKg ?? 0) : -(estimateKg ?? 0));

export const TESTING_RULES: RulesFor<'record-test' | 'plan-correction'> = {
  'record-test': {
    who: 'lead',
    atRail: true,
    apply({ state, action, me, nowMs }) {
      const active = needActive(state);
      if (isRefusal(active)) return active;
      const ls = action.lineSetId ? state.lineSets.find((l) => l.id === action.lineSetId) : active;
      if (!ls) return refuse('That line set is not in this session.');
      if (ls.stage === 'tested') {
        // One test per loading: a second one only follows a correction (worked out from this test).
        const last = ls.tests.at(-1)!;
        const found = last.result === 'balanced' ? 'balanced' : `${last.result} by ${formatMass(last.estimateKg ?? 0, sessionUnits(state))}`;
        return alreadyDone(
          `${capital(lineSetLabel(ls.name))} has already been tested: ${found}.${ls.flagged ? ' Work out its correction first; the new test follows it.' : ''}`,
          { lineSetId: ls.id },
        );
      }
      // A test-only plan is tested as soon as the set is in position; any other after "loading complete", untied.
      const testOnlyReady = ls.stage === 'in-position' && isTestOnly(ls) && !ls.tiedOff;
      if (ls !== active || !(testOnlyReady || (ls.stage === 'loading-complete' && !ls.tiedOff))) {
        return refuse(first(lineSetDuty(state, ls)), { lineSetId: ls.id });
      }
      if (action.result !== 'balanced' && action.estimateKg === undefined) {
        return refuse('Give how far out of balance the set is (the estimate) when it is not balanced.', { lineSetId: ls.id });
      }
      const wasFlagged = ls.flagged;
      const estimateKg = action.result === 'balanced' ? null : (action.estimateKg ?? null);
      // Beyond what the rope lock holds, the set must be tied off before anyone moves on (common practice).
      const beyondLock = estimateKg !== null && estimateKg > ls.ropeLockLimitKg;
      if (beyondLock && !action.tiedOff) {
        return refuse(
          `That is more out of balance than the rope lock holds (${formatMass(ls.ropeLockLimitKg, sessionUnits(state))}): tie ${lineSetLabel(ls.name)} off at the rail first, keep it attended, and record the test as tied off.`,
          { lineSetId: ls.id },
        );
      }
      const wasTied = ls.tiedOff;
      ls.tiedOff = beyondLock || (ls.tiedOff && action.result !== 'balanced');
      ls.tests.push({ result: action.result, estimateKg, note: action.note ?? null, atMs: nowMs, byPersonId: me.personId });
      ls.flagged = action.result !== 'balanced';
      ls.measuredKg = signedEstimate(action.result, estimateKg);
      ls.stage = 'tested';
      markDone(ls, 'test-balance');
      const entries: LogDraft[] = [
        {
          kind: 'test-recorded',
          lineSetId: ls.id,
          details: {
            ...lineSetRef(ls),
            result: action.result,
            estimateKg,
            note: action.note ?? null,
            flagged: ls.flagged,
            flagCleared: wasFlagged && !ls.flagged,
            tiedOff: ls.tiedOff,
            untied: wasTied && !ls.tiedOff,
            computedImbalanceKg: ls.imbalanceKg,
            measuredImbalanceKg: ls.measuredKg,
            afterCorrection: (ls.corrections ?? []).length > 0 && ls.tests.length > 1,
          },
        },
      ];
      return { ok: true, entries: [...entries, ...finishIfComplete(state, nowMs)] };
    },
  },

  'plan-correction': {
    who: 'lead',
    atRail: false,
    apply({ state, action, nowMs }) {
      if (state.phase === 'gathering') return refuse(first(lineSetDuty(state, state.lineSets[0])));
      const active = activeLineSet(state);
      const ls = action.lineSetId ? state.lineSets.find((l) => l.id === action.lineSetId) : active;
      if (!ls) return refuse('That line set is not in this session.');
      if (ls.stage !== 'tested') {
        if (ls.corrections?.length && ls.stage !== 'waiting') {
          return alreadyDone(`The correction for ${lineSetLabel(ls.name)} is under way.`, { lineSetId: ls.id });
        }
        return refuse(first(lineSetDuty(state, ls)), { lineSetId: ls.id });
      }
      if (!ls.flagged) return alreadyDone(`${capital(lineSetLabel(ls.name))} tested balanced: there is nothing to correct.`, { lineSetId: ls.id });
      if (active && active !== ls && active.stage !== 'tested') {
        return refuse(`${capital(lineSetLabel(active.name))} is being worked: ${lineSetDuty(state, active).replace(/^T/, 't')} first.`, { lineSetId: ls.id });
      }
      const measuredKg = ls.measuredKg ?? signedEstimate(ls.tests.at(-1)!.result, ls.tests.at(-1)!.estimateKg);
      const r = correctionSteps({
        measuredKg,
        purchase: ls.load.purchase,
        arborKg: ls.load.arborKg,
        bricks: ls.load.bricks,
        brickTypes: ls.brickTypes,
        bridgeStock: state.bridgeStock ?? {},
        ...(ls.arborCapacityKg !== undefined ? { arborCapacityKg: ls.arborCapacityKg } : {}),
        ropeLockLimitKg: ls.ropeLockLimitKg,
        tiedOff: ls.tiedOff,
        units: sessionUnits(state),
        ...(state.settings.spreaderSpacingM !== undefined ? { spreaderSpacingM: state.settings.spreaderSpacingM } : {}),
      });
      const error = r.warnings.find((w) => w.severity === 'error');
      if (error) return refuse(`${capital(lineSetLabel(ls.name))} cannot be corrected by Railcall: ${error.message}`, { lineSetId: ls.id });
      const fromStep = ls.steps.length;
      ls.corrections = [...(ls.corrections ?? []), { fromStep, measuredKg, computedKg: ls.imbalanceKg, loadBefore: structuredClone(ls.load), atMs: nowMs }];
      ls.steps.push(...r.steps);
      ls.done.push(...r.steps.map(() => false));
      // The set is still in at the loading position: the loaders clear the rail again for the bricks.
      ls.stage = 'in-position';
      ls.needsTieOff = ls.tiedOff;
      ls.railClearAtMs = null;
      ls.loadingCompleteAtMs = null;
      state.activeIndex = state.lineSets.indexOf(ls);
      return {
        ok: true,
        entries: [
          {
            kind: 'correction-planned',
            lineSetId: ls.id,
            details: {
              ...lineSetRef(ls),
              measuredKg,
              computedKg: ls.imbalanceKg,
              measuredText: balanceText(measuredKg, sessionUnits(state)),
              steps: structuredClone(r.steps),
              fromStep,
              expectedKg: r.expectedKg,
              warnings: r.warnings.map((w) => w.message),
            },
          },
        ],
      };
    },
  },
};
