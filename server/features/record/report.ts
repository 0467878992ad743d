import { describeEntry, stepText, type LogEntry, type SessionState } from '@shared/protocol/session';
import { ROLE_LABELS } from '@shared/protocol/roles';
import { formatZonedStamp, type ChainCheck, type ReportEntry, type SessionOutcome, type SessionReport } from '@shared/protocol/record';
import { loadImbalanceKg, type Units } from '@shared/rigging';

/** How a session came out, from its state. */
export function outcomeOf(state: SessionState): SessionOutcome {
  const flagged = state.lineSets.filter((l) => l.flagged).map((l) => l.name);
  if (state.phase !== 'finished') return { kind: 'running' };
  if (state.endedHow === 'ended') return { kind: 'ended-early', reason: state.endReason ?? '', flagged };
  return flagged.length ? { kind: 'flagged', lineSets: flagged } : { kind: 'balanced' };
}

export interface ReportSource {
  id: number;
  title: string;
  venueName: string;
  units: Units;
  timeZone: string;
  caution: string;
  openedAtMs: number;
  createdByName: string;
  state: SessionState;
  /** Session line set id → line_set.id on the schedule. */
  scheduleIds: Record<string, number>;
  entries: LogEntry[];
  genesisHash: string;
  lastSeq: number;
  lastHash: string;
  chain: ChainCheck;
}

/** Everything the report shows, in one plain object: the screen, the PDF and the CSV read the same one. */
export function buildReport(src: ReportSource): SessionReport {
  const { state, timeZone, units } = src;
  const names = new Map(state.lineSets.map((l) => [l.id, l.name]));
  const entries: ReportEntry[] = src.entries.map((e) => ({
    seq: e.seq,
    atMs: e.serverTimeMs,
    time: formatZonedStamp(e.serverTimeMs, timeZone),
    personName: e.personName,
    role: e.role === 'system' ? 'Railcall' : e.role ? ROLE_LABELS[e.role] : '',
    kind: e.kind,
    lineSet: e.lineSetId ? (names.get(e.lineSetId) ?? e.lineSetId) : '',
    text: e.kind === 'refused'
      ? `${e.personName}: refused (${String((e.details.action as { type?: string })?.type ?? 'action')}): ${String(e.details.reason ?? '')}`
      : describeEntry(e, state, units),
    hash: e.hash,
  }));

  // The crew: everyone who joined, in their role, from the log (people who left stay in the record).
  const crew: SessionReport['crew'] = [];
  for (const e of src.entries) {
    if (e.kind !== 'joined' || e.personId === null || !e.role || e.role === 'system') continue;
    if (crew.some((c) => c.personId === e.personId && c.role === e.role)) continue;
    crew.push({ personId: e.personId, name: e.personName, role: e.role, joinedAtMs: e.serverTimeMs, lead: e.details.lead === true });
  }
  const lead = crew.find((c) => c.lead) ?? null;

  const lineSets = state.lineSets.map((ls) => {
    const logged = new Map<number, LogEntry>();
    for (const e of src.entries) if (e.kind === 'step-confirmed' && e.lineSetId === ls.id && e.stepIndex !== null) logged.set(e.stepIndex, e);
    return {
      id: ls.id,
      scheduleId: src.scheduleIds[ls.id] ?? null,
      name: ls.name,
      ropeLockLimitKg: ls.ropeLockLimitKg,
      steps: ls.steps.map((step, i) => {
        const e = logged.get(i);
        return {
          index: i,
          text: stepText(ls, i),
          plannedAfterKg: step.imbalanceAfterKg,
          done: ls.done[i],
          loggedAfterKg: e ? Number(e.details.imbalanceKg) : null,
          atMs: e?.serverTimeMs ?? null,
        };
      }),
      beforeKg: loadImbalanceKg(ls.startLoad, ls.brickTypes),
      afterKg: ls.imbalanceKg,
      tests: ls.tests.map((t) => ({ atMs: t.atMs, result: t.result, estimateKg: t.estimateKg, note: t.note })),
      flagged: ls.flagged,
    };
  });

  const holds: SessionReport['holds'] = [];
  for (const e of src.entries) {
    if (e.kind === 'hold-called') {
      holds.push({ calledAt: formatZonedStamp(e.serverTimeMs, timeZone), byName: e.personName, reason: (e.details.reason as string | null) ?? null, releasedAt: null, heldForS: null });
    } else if (e.kind === 'hold-reason-given' && holds.length) {
      holds[holds.length - 1].reason = String(e.details.reason ?? '') || null;
    } else if (e.kind === 'hold-released' && holds.length) {
      const h = holds[holds.length - 1];
      h.releasedAt = formatZonedStamp(e.serverTimeMs, timeZone);
      h.heldForS = Math.round(Number(e.details.heldForMs ?? 0) / 1000);
    }
  }

  return {
    id: src.id,
    title: src.title,
    venueName: src.venueName,
    units,
    timeZone,
    openedAtMs: src.openedAtMs,
    beganAtMs: state.beganAtMs,
    endedAtMs: state.endedAtMs,
    createdByName: src.createdByName,
    leadName: lead?.name ?? null,
    outcome: outcomeOf(state),
    shortCrewReason: state.shortCrewReason,
    crew,
    lineSets,
    entries,
    refusals: entries.filter((e) => e.kind === 'refused'),
    holds,
    reAlerts: entries.filter((e) => e.kind === 're-alerted'),
    notes: entries.filter((e, i) => e.kind === 'note' || (e.kind === 'test-recorded' && Boolean(src.entries[i].details.note))),
    caution: src.caution,
    genesisHash: src.genesisHash,
    lastHash: src.lastHash,
    lastSeq: src.lastSeq,
    chain: src.chain,
  };
}

