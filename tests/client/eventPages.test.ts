import { describe, expect, it } from 'vitest';
import type { EventsPage } from '@shared/protocol/sessions-api';
import { followEventPages } from '@/services/api';

/** A log of `total` entries served the way the server pages it (after, limit; `more` and `nextAfter`). */
function pagedLog(total: number, limit: number) {
  const asked: number[] = [];
  const getPage = async (after: number): Promise<EventsPage<number>> => {
    asked.push(after);
    const entries = Array.from({ length: Math.max(0, Math.min(limit, total - after)) }, (_, i) => after + i + 1);
    return { entries, lastSeq: total, more: after + entries.length < total, nextAfter: entries.at(-1) ?? after };
  };
  return { asked, getPage };
}

describe('catching up over paged HTTP', () => {
  it('follows every page to the end, asking after the last seq of each', async () => {
    const log = pagedLog(1203, 500);
    const { entries, lastSeq } = await followEventPages(log.getPage, 0);
    expect(entries).toEqual(Array.from({ length: 1203 }, (_, i) => i + 1));
    expect(lastSeq).toBe(1203);
    expect(log.asked).toEqual([0, 500, 1000]);
  });

  it('asks once when the phone is up to date', async () => {
    const log = pagedLog(40, 500);
    expect((await followEventPages(log.getPage, 40)).entries).toEqual([]);
    expect(log.asked).toEqual([40]);
  });

  it('stops when a page says "more" but does not move on', async () => {
    const stuck = async (): Promise<EventsPage<number>> => ({ entries: [], lastSeq: 9, more: true, nextAfter: 3 });
    expect(await followEventPages(stuck, 3)).toEqual({ entries: [], lastSeq: 9 });
  });
});
