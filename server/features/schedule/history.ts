import type { EntityManager } from 'typeorm';
// TypeORM's partial type cannot follow the json column's [old, new] tuples; the rows are whole entities.
import type { QueryDeepPartialEntity } from 'typeorm/query-builder/QueryPartialEntity.js';
import type { HistorySubject } from '@shared/protocol/schedule';
import { ScheduleChangeRow } from './schedule-change.entity';

/** Who made a change and how: a person at a screen, a CSV import, or a loading session's write-back. */
export interface ChangeAuthor {
  personId: number | null;
  personName: string;
  reason?: string;
  sessionId?: number | null;
  via?: string | null;
}

const same = (a: unknown, b: unknown) => JSON.stringify(a) === JSON.stringify(b);

/** field -> [old, new] for every field of `after` whose value differs from `before`. */
export function diffFields<T extends object>(before: T | null, after: T | null, fields: readonly (keyof T & string)[]): Record<string, [unknown, unknown]> {
  const changes: Record<string, [unknown, unknown]> = {};
  for (const f of fields) {
    const was = before ? before[f] : null;
    const now = after ? after[f] : null;
    if (!same(was ?? null, now ?? null)) changes[f] = [was ?? null, now ?? null];
  }
  return changes;
}

/** One change to keep: what changed, before the author and time are added. */
export interface ChangeEntry {
  venueId: number;
  subject: HistorySubject;
  subjectId: number | null;
  lineSetId: number | null;
  action: 'create' | 'update' | 'delete';
  changes: Record<string, [unknown, unknown]>;
}

/** History rows written by one multi-row INSERT: about 1 kB each, so a statement stays far below max_allowed_packet. */
const HISTORY_ROWS_PER_INSERT = 500;

/** Appends one change to the venue's history (in the caller's transaction). Nothing changed: nothing kept. */
export async function recordChange(m: EntityManager, entry: ChangeEntry, author: ChangeAuthor, atMs = Date.now()): Promise<void> {
  await recordChanges(m, [entry], author, atMs);
}

/**
 * Appends many changes by one author in their order, with multi-row INSERTs (a CSV import writes
 * thousands): the same rows as `recordChange` one by one, in a few round trips.
 */
export async function recordChanges(m: EntityManager, entries: ChangeEntry[], author: ChangeAuthor, atMs = Date.now()): Promise<void> {
  const rows = entries
    .filter((e) => !(e.action === 'update' && Object.keys(e.changes).length === 0))
    .map((e) => m.getRepository(ScheduleChangeRow).create({
      ...e,
      personId: author.personId,
      personName: author.personName,
      reason: author.reason ?? '',
      sessionId: author.sessionId ?? null,
      via: author.via ?? null,
      atMs,
    }));
  for (let i = 0; i < rows.length; i += HISTORY_ROWS_PER_INSERT) {
    await m.createQueryBuilder().insert().into(ScheduleChangeRow).values(rows.slice(i, i + HISTORY_ROWS_PER_INSERT) as QueryDeepPartialEntity<ScheduleChangeRow>[]).updateEntity(false).execute();
  }
}
