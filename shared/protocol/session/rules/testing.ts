/**
 * The rail operator's test of balance after loading, and a re-test of a set after a correction.
 */
import { formatMass } from '../../../rigging';
import { capital, lineSetDuty, lineSetLabel } from '../words';
import { finishIfComplete, first, isRefusal, lineSetRef, markDone, needActive, refuse, type LogDraft, type RulesFor } from './common';

export const TESTING_RULES: RulesFor<'record-test'> = {
  'record-test': {
    who: 'lead',
    atRail: true,
    apply({ state, action, me, nowMs }) {
      const active = needActive(state);
      if (isRefusal(active)) return active;
      const ls = action.lineSetId ? state.lineSets.find((l) => l.id === action.lineSetId) : active;
      if (!ls) return refuse('That line set is not in this session.');
      if (ls !== active) {
        // A re-test of an earlier set, after a correction: only between line sets.
        if (ls.stage !== 'tested') return refuse(first(lineSetDuty(state, ls)), { lineSetId: ls.id });
        if (active.stage !== 'tested') {
          return refuse(`${capital(lineSetLabel(active.name))} is being worked: ${lineSetDuty(state, active).replace(/^T/, 't')} first.`, { lineSetId: ls.id });
        }
      } else if (!(ls.stage === 'tested' || (ls.stage === 'loading-complete' && !ls.tiedOff))) {
        return refuse(first(lineSetDuty(state, ls)), { lineSetId: ls.id });
      }
      if (action.result !== 'balanced' && action.estimateKg === undefined) {
        return refuse('Give an estimate in kg for a set that is out of balance.', { lineSetId: ls.id });
      }
      const wasFlagged = ls.flagged;
      const estimateKg = action.result === 'balanced' ? null : (action.estimateKg ?? null);
      // Beyond what the rope lock holds, the set must be tied off before anyone moves on (TRADE.md).
      const beyondLock = estimateKg !== null && estimateKg > ls.ropeLockLimitKg;
      if (beyondLock && !action.tiedOff) {
        return refuse(
          `That is more out of balance than the rope lock holds (${formatMass(ls.ropeLockLimitKg, 'imperial')}, ${formatMass(ls.ropeLockLimitKg, 'metric')}): tie ${lineSetLabel(ls.name)} off at the rail first, keep it attended, and record the test as tied off.`,
          { lineSetId: ls.id },
        );
      }
      const wasTied = ls.tiedOff;
      ls.tiedOff = beyondLock || (ls.tiedOff && action.result !== 'balanced');
      ls.tests.push({ result: action.result, estimateKg, note: action.note ?? null, atMs: nowMs, byPersonId: me.personId });
      ls.flagged = action.result !== 'balanced';
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
          },
        },
      ];
      return { ok: true, entries: [...entries, ...finishIfComplete(state, nowMs)] };
    },
  },
};
