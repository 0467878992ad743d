/**
 * The kept record of past sessions: the history and its filters, the session report (on screen, PDF,
 * CSV), the line set's own record and the check of an exported file.
 */
import { z } from 'zod';
import type { Units } from '../rigging';
import type { SessionRole } from './roles';
import type { LogEntry } from './session';
import { isKnownTimeZone, utcOffsetName } from './time-zone';

const day = z.string().regex(/^\d{4}-\d{2}-\d{2}$/, 'Give a date as YYYY-MM-DD');

/** `GET /api/record/sessions`: every filter optional; `from` and `to` are days in the venue's time zone, inclusive. */
export const historyQuerySchema = z
  .object({
    lineSetId: z.coerce.number().int().positive('Not a valid line set').optional(),
    personId: z.coerce.number().int().positive('Not a valid person').optional(),
    from: day.optional(),
    to: day.optional(),
  })
  .refine((q) => !q.from || !q.to || q.from <= q.to, { message: 'The end date is before the start date', path: ['to'] });
export type HistoryQuery = z.infer<typeof historyQuerySchema>;

/** How a session came out, in the words the history shows. */
export type SessionOutcome =
  | { kind: 'balanced' }
  | { kind: 'flagged'; lineSets: string[] }
  | { kind: 'ended-early'; reason: string; flagged: string[] }
  | { kind: 'running' };

export function outcomeText(o: SessionOutcome): string {
  switch (o.kind) {
    case 'balanced': return 'Every line set balanced';
    case 'flagged': return `Flagged out of balance: ${o.lineSets.join(', ')}`;
    case 'ended-early': return `Ended early: ${o.reason}${o.flagged.length ? ` (flagged: ${o.flagged.join(', ')})` : ''}`;
    case 'running': return 'Not finished';
  }
}

export interface HistoryRow {
  id: number;
  title: string;
  startedAtMs: number;
  endedAtMs: number | null;
  leadName: string | null;
  createdByName: string;
  lineSets: Array<{ scheduleId: number; name: string }>;
  outcome: SessionOutcome;
}

export interface HistoryAnswer {
  timeZone: string;
  sessions: HistoryRow[];
  /** The venue's line sets and people, for the filters. */
  lineSets: Array<{ id: number; label: string }>;
  people: Array<{ id: number; name: string }>;
}

export interface LineSetRecord {
  lineSet: { id: number; number: number; name: string };
  timeZone: string;
  units: Units;
  sessions: HistoryRow[];
  tests: Array<{ sessionId: number; atMs: number; byName: string; result: string; estimateKg: number | null; note: string | null; computedKg: number | null }>;
  tieOffs: Array<{ sessionId: number; atMs: number; byName: string; kind: 'tied-off' | 'untied' }>;
}

export interface ReportEntry {
  seq: number;
  atMs: number;
  /** Date and time to the second, in the venue's time zone. */
  time: string;
  personName: string;
  role: string;
  kind: string;
  lineSet: string;
  text: string;
  hash: string;
}

export interface ReportLineSet {
  id: string;
  /** The line set on the venue's schedule, for its own record page. */
  scheduleId: number | null;
  name: string;
  ropeLockLimitKg: number;
  /** The plan, step by step, with the computed balance after each and what was logged when it was done. */
  steps: Array<{ index: number; text: string; plannedAfterKg: number; done: boolean; loggedAfterKg: number | null; atMs: number | null }>;
  beforeKg: number;
  /** Computed after the last confirmed step. */
  afterKg: number;
  /** What the rail found at its tests, last one last. */
  tests: Array<{ atMs: number; result: string; estimateKg: number | null; note: string | null }>;
  flagged: boolean;
}

export interface SessionReport {
  id: number;
  title: string;
  venueName: string;
  units: Units;
  timeZone: string;
  openedAtMs: number;
  beganAtMs: number | null;
  endedAtMs: number | null;
  createdByName: string;
  leadName: string | null;
  outcome: SessionOutcome;
  shortCrewReason: string | null;
  crew: Array<{ personId: number; name: string; role: SessionRole; joinedAtMs: number; lead: boolean }>;
  lineSets: ReportLineSet[];
  entries: ReportEntry[];
  refusals: ReportEntry[];
  holds: Array<{ calledAt: string; byName: string; reason: string | null; releasedAt: string | null; heldForS: number | null }>;
  reAlerts: ReportEntry[];
  notes: ReportEntry[];
  caution: string;
  genesisHash: string;
  lastHash: string;
  lastSeq: number;
  chain: ChainCheck;
}

export type ChainCheck = { ok: true; entries: number } | { ok: false; atSeq: number; problem: string };

/** An exported record (`GET /api/sessions/:id/record`), as a reader checks it. */
export const exportedRecordSchema = z.object({
  genesisHash: z.string().regex(/^[0-9a-f]{64}$/, 'Not a genesis hash'),
  lastSeq: z.number().int().min(0),
  lastHash: z.string(),
  entries: z.array(
    z.object({
      seq: z.number().int(),
      serverTimeMs: z.number(),
      clientTimeMs: z.number().nullable(),
      personId: z.number().int().nullable(),
      personName: z.string(),
      role: z.string().nullable(),
      kind: z.string(),
      lineSetId: z.string().nullable(),
      stepIndex: z.number().int().nullable(),
      details: z.record(z.string(), z.unknown()),
      prevHash: z.string(),
      hash: z.string(),
    }),
  ).max(100_000),
}, { error: 'This is not a Railcall session record' });

/** `POST /api/record/verify`: the exported file's text, as chosen on the page. */
export const verifyRequestSchema = z.object({
  fileName: z.string().max(255).optional(),
  text: z.string().min(1, 'The file is empty').max(20_000_000, 'The file is too large'),
});

export interface VerifyAnswer {
  chain: ChainCheck;
  sessionTitle: string | null;
  entries: number;
}

export type ExportedEntry = LogEntry;

/** "2 Dec 2026, 14:05:09": a date and a time to the second in the given IANA time zone. */
export function formatStamp(ms: number, timeZone: string): string {
  return new Intl.DateTimeFormat('en-GB', {
    timeZone, day: 'numeric', month: 'short', year: 'numeric', hour: '2-digit', minute: '2-digit', second: '2-digit', hourCycle: 'h23',
  }).format(ms);
}

/** "2 Dec 2026, 14:05:09 UTC+1": `formatStamp` with the zone's offset at that moment, so a time read alone is never ambiguous. */
export function formatZonedStamp(ms: number, timeZone: string): string {
  return `${formatStamp(ms, timeZone)} ${utcOffsetName(ms, timeZone)}`;
}

/** The time zone's offset name at that moment ("GMT+1", "UTC"). */
export function zoneName(ms: number, timeZone: string): string {
  const part = new Intl.DateTimeFormat('en-GB', { timeZone, timeZoneName: 'short' }).formatToParts(ms).find((p) => p.type === 'timeZoneName');
  return part?.value ?? timeZone;
}

/** Milliseconds at the start of a day (YYYY-MM-DD) in a time zone. */
export function dayStartMs(date: string, timeZone: string): number {
  const utc = Date.parse(`${date}T00:00:00Z`);
  // The zone's offset near that midnight, read back from how the zone writes the UTC instant.
  const parts = Object.fromEntries(
    new Intl.DateTimeFormat('en-CA', { timeZone, year: 'numeric', month: '2-digit', day: '2-digit', hour: '2-digit', minute: '2-digit', second: '2-digit', hourCycle: 'h23' })
      .formatToParts(utc).map((p) => [p.type, p.value]),
  );
  const asZone = Date.parse(`${parts.year}-${parts.month}-${parts.day}T${parts.hour}:${parts.minute}:${parts.second}Z`);
  return utc - (asZone - utc);
}

/** The venue's time zone, or UTC when it has none or an unknown one. */
export function venueTimeZone(settings: { timeZone?: unknown }): string {
  return typeof settings.timeZone === 'string' && isKnownTimeZone(settings.timeZone) ? settings.timeZone : 'UTC';
}
