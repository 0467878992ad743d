import type { EntityManager } from 'typeorm';
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

/** Appends one change to the venue's history (in the caller's transaction). Nothing changed: nothing kept. */
export async function recordChange(
  m: EntityManager,
  entry: { venueId: number; subject: HistorySubject; subjectId: number | null; lineSetId: number | null; action: 'create' | 'update' | 'delete'; changes: Record<string, [unknown, unknown]> },
  author: ChangeAuthor,
  atMs = Date.now(),
): Promise<void> {
  if (entry.action === 'update' && Object.keys(entry.changes).length === 0) return;
  const repo = m.getRepository(ScheduleChangeRow);
  await repo.save(repo.create({
    ...entry,
    personId: author.personId,
    personName: author.personName,
    reason: author.reason ?? '',
    sessionId: author.sessionId ?? null,
    via: author.via ?? null,
    atMs,
  }));
}
