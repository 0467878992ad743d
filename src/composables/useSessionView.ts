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

/** "10 ft" or "3 m": the distance to keep from the rail while the loaders work (common practice). */
export const railDistance = (units: Units) => (units === 'imperial' ? '10 ft' : '3 m');

/**
 * While the loaders work, nobody is at the rail or under the gallery; the rail operator still keeps
 * the tie-off attended, by watching it (and the rail) from that distance (common practice).
 * One sentence says both, so the two rules never read as contradicting each other.
 */
export const railClearCaution = (units: Units, tiedOff = false) =>
  tiedOff
    ? `Watch the rail and the tie-off from at least ${railDistance(units)} away, out from under the gallery: nobody is at the rail or under the gallery while the loaders work.`
    : `Stand at least ${railDistance(units)} away from the rail and out from under the gallery, and keep watch: nobody is at the rail or under the gallery while the loaders work.`;
/** At the rail with a tie-off on (before the rail is cleared, or after loading complete). */
export const TIE_OFF_CAUTION = 'Stay with the tie-off: it is never left unattended.';

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
