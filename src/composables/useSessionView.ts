import { computed, type Ref } from 'vue';
import {
  activeLineSet,
  allowedActions,
  lineSetLabel,
  nextStepFor,
  nextWorkStepIndex,
  participantOf,
  waitingOn,
  type ActionType,
  type SessionState,
} from '@shared/protocol/session';
import type { Units } from '@shared/rigging';

/** "10 ft" or "3 m": the distance to keep from the rail while the loaders work (TRADE.md). */
export const railDistance = (units: Units) => (units === 'imperial' ? '10 ft' : '3 m');

export const railClearCaution = (units: Units) =>
  `Stand at least ${railDistance(units)} away from the rail and out from under the gallery, and keep watch.`;
export const TIE_OFF_CAUTION = 'Never leave a tie-off unattended.';

/**
 * What one person's screen reads from the session state: the line set in hand, what they may do
 * now (asked of the shared rules, so nothing is offered that the server would refuse) and the
 * sentence for their next step.
 */
export function useSessionView(state: Ref<SessionState>, personId: Ref<number>) {
  const me = computed(() => participantOf(state.value, personId.value) ?? null);
  const isLead = computed(() => state.value.leadPersonId === personId.value);
  /** The line set being worked, else the next one waiting, else the first. */
  const lineSet = computed(
    () => activeLineSet(state.value) ?? state.value.lineSets.find((l) => l.stage === 'waiting') ?? state.value.lineSets[0],
  );
  const label = computed(() => lineSetLabel(lineSet.value.name));
  const allowed = computed(() => allowedActions(state.value, personId.value));
  const can = (type: ActionType) => allowed.value.includes(type);
  const next = computed(() => nextStepFor(state.value, personId.value));
  const waiting = computed(() => waitingOn(state.value));
  const nextWorkIndex = computed(() => nextWorkStepIndex(lineSet.value));
  /** The sentence for this person's screen. */
  const nextText = computed(() => next.value.text);
  return { me, isLead, lineSet, label, allowed, can, next, nextText, waiting, nextWorkIndex };
}
