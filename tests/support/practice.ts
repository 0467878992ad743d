import { PracticeEngine, actionFor } from '@shared/practice';
import type { PracticeStart } from '@shared/protocol/practice';
import { nextStepFor } from '@shared/protocol/session';

/**
 * Plays a practice the server set up, on a virtual clock: the person practising does their next
 * duty two seconds after it comes up, the simulated crew does what it does. Returns what a phone
 * would send to keep it.
 */
export function playPractice(start: PracticeStart, startMs: number, { stopAfterTaps }: { stopAfterTaps?: number } = {}) {
  const engine = new PracticeEngine(start.setup, start.seed, startMs, { pace: start.pace });
  let now = startMs;
  for (let guard = 0; guard < 1000 && !engine.finished; guard += 1) {
    if (stopAfterTaps !== undefined && engine.taps.length >= stopAfterTaps) {
      engine.stop(now);
      break;
    }
    const mine = nextStepFor(engine.state, engine.you.personId).actions[0];
    const wake = engine.nextWakeMs();
    const at = Math.min(mine ? now + 2000 : Infinity, wake ?? Infinity);
    if (!Number.isFinite(at)) break;
    now = Math.max(now, at);
    engine.advance(now);
    const main = nextStepFor(engine.state, engine.you.personId).actions[0];
    const action = main && !engine.finished ? actionFor(main, engine.state, engine.you) : null;
    if (action) engine.tap(action, now);
  }
  return { engine, taps: engine.taps, endedAtMs: engine.endedAtMs ?? now };
}
