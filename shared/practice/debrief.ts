/**
 * The debrief of a practice session, computed from its log alone: how long each line set stood out
 * of balance and beyond the rope lock, how long each answer took, and every refused tap with the rule
 * it broke. The server computes the same figures again from the taps it is sent.
 */
import type { PracticeEntry, PracticeSetup, PracticeTap } from './engine';
import { replayPractice } from './engine';
import { balancedWithinKg } from './people';

export interface LineSetDebrief {
  lineSetId: string;
  name: string;
  /** Time its imbalance was beyond what whole bricks can correct (see balancedWithinKg). */
  outOfBalanceMs: number;
  /** Time its imbalance was beyond the rope lock limit (it had to be tied off). */
  beyondRopeLockMs: number;
  /** The largest imbalance it reached, kg at the batten (positive = pipe-heavy). */
  worstImbalanceKg: number;
}

export interface AnswerTime {
  personId: number;
  name: string;
  simulated: boolean;
  /** 'clear' answers a move call; 'hold' acknowledges a hold. */
  kind: 'clear' | 'hold';
  lineSetId: string | null;
  tookMs: number;
  /** Railcall had to re-alert this person first. */
  reAlerted: boolean;
}

/** What a refusal says about the rule: out of order, not this role's to do, or done already. */
export const RULE_KINDS = { refused: 'out of order', forbidden: 'not for this role', 'already-done': 'already done' } as const;

export interface RefusedTap {
  seq: number;
  atMs: number;
  personId: number | null;
  name: string;
  simulated: boolean;
  actionType: string;
  rule: (typeof RULE_KINDS)[keyof typeof RULE_KINDS];
  reason: string;
}

export interface PracticeDebrief {
  outcome: 'complete' | 'ended' | 'stopped';
  startedAtMs: number;
  endedAtMs: number;
  durationMs: number;
  outOfBalanceMs: number;
  beyondRopeLockMs: number;
  lineSets: LineSetDebrief[];
  answers: AnswerTime[];
  refusals: RefusedTap[];
  /** Refused taps of the person practising (the ones that matter for their training). */
  yourRefusals: number;
  /** Median time the person practising took to answer, or null when they answered nothing. */
  yourMedianAnswerMs: number | null;
  reAlerts: number;
  holds: number;
}

const median = (xs: number[]): number | null => {
  if (!xs.length) return null;
  const s = [...xs].sort((a, b) => a - b);
  const mid = Math.floor(s.length / 2);
  return s.length % 2 ? s[mid] : (s[mid - 1] + s[mid]) / 2;
};

/**
 * The debrief of a practice from its setup and taps. `endedAtMs` closes the last interval (the
 * practice's end: finished by the rules or stopped by the person).
 */
export function computeDebrief(setup: PracticeSetup, taps: readonly PracticeTap[], endedAtMs: number): PracticeDebrief {
  const { log, states } = replayPractice(setup, taps);
  const initial = replayPractice(setup, []).state;
  const startedAtMs = taps[0]?.atMs ?? endedAtMs;
  const lineSets: LineSetDebrief[] = initial.lineSets.map((ls) => ({
    lineSetId: ls.id,
    name: ls.name,
    outOfBalanceMs: 0,
    beyondRopeLockMs: 0,
    worstImbalanceKg: ls.imbalanceKg,
  }));
  // The state stands from one tap to the next: integrate each line set's imbalance over that time.
  taps.forEach((tap, i) => {
    const after = states[i];
    const untilMs = Math.min(taps[i + 1]?.atMs ?? endedAtMs, endedAtMs);
    const spanMs = Math.max(0, untilMs - tap.atMs);
    after.lineSets.forEach((ls, j) => {
      const d = lineSets[j];
      const off = Math.abs(ls.imbalanceKg);
      if (off > balancedWithinKg(ls.brickTypes)) d.outOfBalanceMs += spanMs;
      if (off > ls.ropeLockLimitKg) d.beyondRopeLockMs += spanMs;
      if (off > Math.abs(d.worstImbalanceKg)) d.worstImbalanceKg = ls.imbalanceKg;
    });
  });

  const answers: AnswerTime[] = [];
  const calledAt = new Map<string, number>();
  const reAlerted = new Set<string>();
  let holdAtMs: number | null = null;
  for (const e of log) {
    if (e.refusal) continue;
    if (e.kind === 'move-called' && e.lineSetId) calledAt.set(e.lineSetId, e.atMs);
    if (e.kind === 're-alerted') {
      const named = (e.details.people as Array<{ personId: number }> | undefined) ?? [];
      for (const p of named) reAlerted.add(`${e.lineSetId ?? ''}:${p.personId}`);
    }
    if (e.kind === 'clear-answered' && e.lineSetId && e.personId !== null && calledAt.has(e.lineSetId)) {
      answers.push({
        personId: e.personId,
        name: e.personName,
        simulated: e.simulated,
        kind: 'clear',
        lineSetId: e.lineSetId,
        tookMs: e.atMs - calledAt.get(e.lineSetId)!,
        reAlerted: reAlerted.has(`${e.lineSetId}:${e.personId}`),
      });
    }
    if (e.kind === 'hold-called') holdAtMs = e.atMs;
    if (e.kind === 'hold-acknowledged' && holdAtMs !== null && e.personId !== null) {
      answers.push({ personId: e.personId, name: e.personName, simulated: e.simulated, kind: 'hold', lineSetId: null, tookMs: e.atMs - holdAtMs, reAlerted: false });
    }
  }

  const refusals: RefusedTap[] = log
    .filter((e) => e.refusal)
    .map((e) => ({
      seq: e.seq,
      atMs: e.atMs,
      personId: e.personId,
      name: e.personName,
      simulated: e.simulated,
      actionType: e.refusal!.actionType,
      rule: RULE_KINDS[e.refusal!.code],
      reason: e.refusal!.reason,
    }));
  const final = states.at(-1) ?? initial;
  const you = setup.you.personId;
  return {
    outcome: final.phase === 'finished' ? (final.endedHow === 'complete' ? 'complete' : 'ended') : 'stopped',
    startedAtMs,
    endedAtMs,
    durationMs: Math.max(0, endedAtMs - startedAtMs),
    outOfBalanceMs: lineSets.reduce((sum, l) => sum + l.outOfBalanceMs, 0),
    beyondRopeLockMs: lineSets.reduce((sum, l) => sum + l.beyondRopeLockMs, 0),
    lineSets,
    answers,
    refusals,
    yourRefusals: refusals.filter((r) => r.personId === you).length,
    yourMedianAnswerMs: median(answers.filter((a) => a.personId === you).map((a) => a.tookMs)),
    reAlerts: log.filter((e) => e.kind === 're-alerted' && !e.refusal).length,
    holds: log.filter((e) => e.kind === 'hold-called' && !e.refusal).length,
  };
}
