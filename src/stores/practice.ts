import { defineStore } from 'pinia';
import { computed, ref, shallowRef } from 'vue';
import { PracticeEngine, type PracticeDebrief, type PracticeEntry } from '@shared/practice';
import type { PracticeStart, StartPracticeInput } from '@shared/protocol/practice';
import type { SessionAction } from '@shared/protocol/session';
import * as api from '@/services/api';
import { failureMessage } from '@/services/http';

/** How often the phone lets the simulated crew move at most (they act at their own due times). */
const MAX_TICK_MS = 1000;

/**
 * The practice session on this phone: the engine (the real rules and the simulated crew), a timer
 * that lets the crew act when they mean to, and keeping the result on the server at the end.
 * Nothing here talks to a live session.
 */
export const usePracticeStore = defineStore('practice', () => {
  const start = shallowRef<PracticeStart | null>(null);
  const engine = shallowRef<PracticeEngine | null>(null);
  /** Bumped after every change of the engine, so views recompute (the engine changes in place). */
  const version = ref(0);
  const starting = ref(false);
  const keeping = ref(false);
  const error = ref<string | null>(null);
  const debrief = shallowRef<PracticeDebrief | null>(null);
  /** The last refusal of the person's own tap, in the rules' words. */
  const refusal = ref<string | null>(null);
  /** When Railcall last re-alerted the person practising (for the alert screen). */
  const reAlertedAtMs = ref<number | null>(null);
  let timer: ReturnType<typeof setTimeout> | null = null;

  const state = computed(() => (version.value, engine.value?.state ?? null));
  const log = computed<PracticeEntry[]>(() => (version.value, [...(engine.value?.log ?? [])]));
  const you = computed(() => engine.value?.you ?? null);
  const finished = computed(() => (version.value, engine.value?.finished ?? false));

  function changed(entries: PracticeEntry[]): void {
    const me = engine.value?.you.personId;
    if (entries.some((e) => e.kind === 're-alerted' && (e.details.people as Array<{ personId: number }>).some((p) => p.personId === me))) {
      reAlertedAtMs.value = Date.now();
    }
    version.value += 1;
    if (engine.value?.finished && !debrief.value && !keeping.value) void keep();
  }

  function schedule(): void {
    if (timer) clearTimeout(timer);
    timer = null;
    const e = engine.value;
    if (!e || e.finished) return;
    const wake = e.nextWakeMs();
    const waitMs = wake === null ? MAX_TICK_MS : Math.min(MAX_TICK_MS, Math.max(0, wake - Date.now()));
    timer = setTimeout(() => {
      const added = e.advance(Date.now());
      if (added.length) changed(added);
      schedule();
    }, waitMs);
  }

  async function begin(input: StartPracticeInput): Promise<void> {
    reset();
    starting.value = true;
    try {
      const answer = await api.startPractice(input);
      start.value = answer;
      engine.value = new PracticeEngine(answer.setup, answer.seed, Date.now(), { pace: answer.pace });
      version.value += 1;
      schedule();
    } catch (failure) {
      error.value = failureMessage(failure);
    } finally {
      starting.value = false;
    }
  }

  function tap(action: SessionAction): void {
    const e = engine.value;
    if (!e || e.finished) return;
    const { entries, ok } = e.tap(action, Date.now());
    refusal.value = ok ? null : (entries[0]?.refusal?.reason ?? null);
    changed(entries);
    schedule();
  }

  /** The person stops before the end: the debrief covers what was done. */
  function stop(): void {
    engine.value?.stop(Date.now());
    changed([]);
  }

  async function keep(): Promise<void> {
    const e = engine.value;
    const s = start.value;
    if (!e || !s || !e.finished) return;
    keeping.value = true;
    error.value = null;
    try {
      const kept = await api.keepPractice(s.practice.id, { taps: e.taps, endedAtMs: e.endedAtMs ?? Date.now() });
      debrief.value = kept.debrief;
    } catch (failure) {
      error.value = `The practice ran, but it could not be kept: ${failureMessage(failure)}`;
    } finally {
      keeping.value = false;
    }
  }

  function reset(): void {
    if (timer) clearTimeout(timer);
    timer = null;
    start.value = null;
    engine.value = null;
    debrief.value = null;
    refusal.value = null;
    error.value = null;
    reAlertedAtMs.value = null;
    version.value += 1;
  }

  return { start, engine, version, state, log, you, finished, starting, keeping, error, debrief, refusal, reAlertedAtMs, begin, tap, stop, keep, reset };
});
