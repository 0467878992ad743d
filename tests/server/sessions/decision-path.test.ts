import { describe, expect, it } from 'vitest';
import { drapeUnloadFixture } from '../../support/crew';

/**
 * The two round trips an action takes (server/features/sessions/hot-path.ts): the lock with the person's
 * roles read after it, then the writes and the commit. Several statements per trip are allowed only on
 * the decisions' own pool.
 */
describe('the decision path', () => {
  const ctx = drapeUnloadFixture({ watch: true });

  it("keeps several statements in one query off the app's main pool", async () => {
    await expect(ctx.t.db.query('SELECT 1; SELECT 2')).rejects.toThrow(/syntax/i);
  });

  it('decides an action that waited for the session lock with the roles held once it has the lock', async () => {
    const { t, crew, sessionId } = ctx;
    const [deck] = await t.database.owner.query("SELECT id FROM person WHERE email = 'deck@larkspur.example'");
    const holder = t.database.owner.createQueryRunner();
    await holder.connect();
    await holder.startTransaction();
    try {
      // Another decision holds the session row: the deck hand's join waits for it.
      await holder.query('SELECT id FROM loading_session WHERE id = ? FOR UPDATE', [sessionId]);
      const join = crew.deck.act(sessionId, { type: 'join', role: 'deck' });
      await new Promise((r) => setTimeout(r, 400));
      // Meanwhile the technical director takes the deck role away (written straight to the table).
      await t.database.owner.query("DELETE FROM venue_role WHERE person_id = ? AND role = 'deck'", [deck.id]);
      await holder.commitTransaction();
      const answer = await join;
      expect(answer.ok).toBe(false);
      const [{ n }] = await t.database.owner.query("SELECT COUNT(*) AS n FROM session_event WHERE session_id = ? AND kind = 'joined' AND person_id = ?", [sessionId, deck.id]);
      expect(Number(n)).toBe(0);
    } finally {
      if (holder.isTransactionActive) await holder.rollbackTransaction();
      await holder.release();
    }
  });

  it('writes nothing of an attempt whose key was used before, however far its second round trip got', async () => {
    const { t, crew, sessionId } = ctx;
    const key = `decision-path-${Date.now()}`;
    await crew.sm.must(sessionId, { type: 'join', role: 'stage-manager' });
    const first = await crew.sm.act(sessionId, { type: 'note', text: 'Checking the fly floor' }, key);
    expect(first.ok).toBe(true);
    const [before] = await t.database.owner.query('SELECT last_seq, last_hash FROM loading_session WHERE id = ?', [sessionId]);
    const again = await crew.sm.act(sessionId, { type: 'note', text: 'Checking the fly floor' }, key);
    expect(again).toEqual(first);
    const [after] = await t.database.owner.query('SELECT last_seq, last_hash FROM loading_session WHERE id = ?', [sessionId]);
    expect(after).toEqual(before);
    const [{ n }] = await t.database.owner.query('SELECT COUNT(*) AS n FROM session_event WHERE session_id = ? AND seq > ?', [sessionId, before.last_seq]);
    expect(Number(n)).toBe(0);
  });
});
