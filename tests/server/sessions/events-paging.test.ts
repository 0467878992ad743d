import { describe, expect, it } from 'vitest';
import request from 'supertest';
import { EVENTS_PAGE_LIMIT } from '@shared/protocol/sessions-api';
import { drapeUnloadFixture } from '../../support/crew';

describe('the session log over HTTP, page by page', () => {
  const ctx = drapeUnloadFixture({ watch: true });
  const get = (query: string) => request(ctx.t.url).get(`/api/sessions/${ctx.sessionId}/events?${query}`).set('Cookie', ctx.crew.sm.cookie);

  it('pages by `limit`, saying when more follows and where to ask next', async () => {
    for (const [phone, role] of [[ctx.crew.loader1, 'loader'], [ctx.crew.deck, 'deck']] as const) {
      await phone.must(ctx.sessionId, { type: 'join', role });
    }
    const all = (await get('after=0')).body;
    expect(all.entries.length).toBe(4); // opened + three joins
    expect(all).toMatchObject({ more: false, nextAfter: 4, lastSeq: 4 });

    const seen: number[] = [];
    let after = 0;
    for (let pages = 0; ; pages++) {
      const page = (await get(`after=${after}&limit=3`)).body;
      seen.push(...page.entries.map((e: { seq: number }) => e.seq));
      expect(page.entries.length).toBeLessThanOrEqual(3);
      if (!page.more) break;
      after = page.nextAfter;
      expect(pages).toBeLessThan(5);
    }
    expect(seen).toEqual([1, 2, 3, 4]);
    expect((await get('after=4')).body).toMatchObject({ entries: [], more: false, nextAfter: 4, lastSeq: 4 });
  });

  it(`refuses a page larger than ${EVENTS_PAGE_LIMIT}, naming the field`, async () => {
    const res = await get(`after=0&limit=${EVENTS_PAGE_LIMIT + 1}`);
    expect(res.status).toBe(400);
    expect(res.body.error.fields.limit).toBeDefined();
    expect(res.body.error.message).toMatch(/check the limit/);
  });

  it('answers a refused action with the seq of its own log entry, over HTTP too', async () => {
    const res = await request(ctx.t.url).post(`/api/sessions/${ctx.sessionId}/actions`).set('Cookie', ctx.crew.deck.cookie)
      .send({ key: 'paging-refusal', clientTimeMs: Date.now(), action: { type: 'begin' } });
    expect(res.status).toBeGreaterThanOrEqual(400);
    const { entries } = (await get('after=0')).body;
    expect(entries.at(-1)).toMatchObject({ kind: 'refused', seq: res.body.seq });
  });
});
