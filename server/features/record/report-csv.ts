import { stringify } from 'csv-stringify/sync';
import { outcomeText, formatZonedStamp, type SessionReport } from '@shared/protocol/record';
import { zoneLabel } from '@shared/protocol/time-zone';
import { ROLE_LABELS } from '@shared/protocol/roles';
import { kgToLb } from '@shared/rigging';

/** Columns of the report CSV. Every row has all of them; `section` says what the row is. */
export const REPORT_CSV_COLUMNS = ['section', 'seq', 'time', 'time_utc', 'person', 'role', 'line_set', 'kind', 'text', 'computed', 'measured', 'hash'] as const;

/**
 * The session report as one CSV table (csv-stringify): the session's facts, the crew, each line set's
 * plan with computed and logged balances, its tests, then every log entry to the second, then the chain.
 */
export function reportCsv(report: SessionReport): string {
  const tz = report.timeZone;
  const unit = report.units === 'imperial' ? 'lb' : 'kg';
  const mass = (kg: number | null) => (kg === null ? '' : `${(report.units === 'imperial' ? kgToLb(kg) : kg).toFixed(2)} ${unit}`);
  const stamp = (ms: number | null) => (ms === null ? '' : formatZonedStamp(ms, tz));
  const utc = (ms: number | null) => (ms === null ? '' : new Date(ms).toISOString());
  type Row = Partial<Record<(typeof REPORT_CSV_COLUMNS)[number], string | number>>;
  const rows: Row[] = [];
  const fact = (kind: string, text: string, ms: number | null = null) => rows.push({ section: 'session', kind, text, time: stamp(ms), time_utc: utc(ms) });

  fact('title', report.title);
  fact('venue', report.venueName);
  fact('time-zone', zoneLabel(report.openedAtMs, tz));
  fact('opened', `by ${report.createdByName}`, report.openedAtMs);
  fact('began', report.beganAtMs === null ? 'never' : '', report.beganAtMs);
  fact('ended', report.endedAtMs === null ? 'not yet' : '', report.endedAtMs);
  fact('lead', report.leadName ?? '');
  fact('outcome', outcomeText(report.outcome));
  if (report.shortCrewReason) fact('short-crew-reason', report.shortCrewReason);
  fact('caution', report.caution);
  for (const c of report.crew) rows.push({ section: 'crew', person: c.name, role: ROLE_LABELS[c.role], kind: c.lead ? 'lead' : '', time: stamp(c.joinedAtMs), time_utc: utc(c.joinedAtMs) });
  for (const ls of report.lineSets) {
    rows.push({ section: 'balance', line_set: ls.name, kind: 'before', computed: mass(ls.beforeKg) });
    for (const s of ls.steps) {
      rows.push({ section: 'plan', seq: s.index + 1, line_set: ls.name, kind: s.done ? 'done' : 'not done', text: s.text, computed: mass(s.plannedAfterKg), measured: mass(s.loggedAfterKg), time: stamp(s.atMs), time_utc: utc(s.atMs) });
    }
    const last = ls.tests.at(-1);
    rows.push({ section: 'balance', line_set: ls.name, kind: 'after', computed: mass(ls.afterKg), measured: last ? `${last.result}${last.estimateKg !== null ? ` ${mass(last.estimateKg)}` : ''}` : 'not tested' });
    for (const t of ls.tests) rows.push({ section: 'test', line_set: ls.name, kind: t.result, text: t.note ?? '', measured: mass(t.estimateKg), time: stamp(t.atMs), time_utc: utc(t.atMs) });
  }
  for (const h of report.holds) rows.push({ section: 'hold', person: h.byName, text: h.reason ?? '', time: h.calledAt, kind: h.releasedAt ? `released ${h.releasedAt} after ${h.heldForS} s` : 'not released' });
  for (const e of report.entries) {
    rows.push({ section: 'entry', seq: e.seq, time: e.time, time_utc: utc(e.atMs), person: e.personName, role: e.role, line_set: e.lineSet, kind: e.kind, text: e.text, hash: e.hash });
  }
  rows.push({ section: 'chain', kind: 'genesis', hash: report.genesisHash });
  rows.push({ section: 'chain', kind: 'last', seq: report.lastSeq, hash: report.lastHash });
  rows.push({ section: 'chain', kind: 'check', text: report.chain.ok ? `all ${report.chain.entries} entries link up` : `breaks at entry ${report.chain.atSeq}: ${report.chain.problem}` });
  return stringify(rows, { header: true, columns: [...REPORT_CSV_COLUMNS] });
}
