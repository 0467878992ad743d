import type { EntityManager } from 'typeorm';
import type { LineSetState, SessionState } from '@shared/protocol/session';
import { BrickTypeRow } from '../schedule/brick-type.entity';
import { LineSetRow } from '../schedule/line-set.entity';
import { PieceRow } from '../schedule/piece.entity';
import type { StoredPlan } from './session.entity';

const PIECE_KEY = /^p(\d+)$/;

/**
 * What the schedule must learn from one decision: a line set's first test writes its new load;
 * every test sets its flag; a session ended early writes the load of every set that was worked but
 * not tested, and flags it, since nobody checked its balance.
 * Runs in the same transaction as the action.
 */
export async function writeBackSchedule(m: EntityManager, venueId: number, plan: StoredPlan, before: SessionState, after: SessionState): Promise<void> {
  await writeBackTestedLineSets(m, venueId, plan, before, after);
  if (before.phase !== 'finished' && after.phase === 'finished' && after.endedHow === 'ended') {
    for (const ls of after.lineSets) {
      const stored = plan.lineSets.find((p) => p.key === ls.id);
      if (!stored || ls.tests.length > 0 || !ls.done.some(Boolean)) continue;
      await writeLoad(m, venueId, stored, ls);
      await m.getRepository(LineSetRow).update({ id: stored.scheduleId, venueId }, { outOfBalance: true });
    }
  }
}

/**
 * Once a line set's balance has been tested, the schedule shows what it carries now: its bricks,
 * its pieces, the bridge stock, and the out-of-balance flag (kept until a balanced test).
 * Runs in the same transaction as the action that recorded the test.
 */
async function writeBackTestedLineSets(m: EntityManager, venueId: number, plan: StoredPlan, before: SessionState, after: SessionState): Promise<void> {
  for (const [i, ls] of after.lineSets.entries()) {
    const was = before.lineSets[i];
    if (ls.tests.length === was.tests.length) continue;
    const stored = plan.lineSets.find((p) => p.key === ls.id);
    if (!stored) continue;
    const firstTest = was.tests.length === 0;
    if (firstTest) await writeLoad(m, venueId, stored, ls);
    await m.getRepository(LineSetRow).update({ id: stored.scheduleId, venueId }, { outOfBalance: ls.flagged });
  }
}

async function writeLoad(m: EntityManager, venueId: number, stored: StoredPlan['lineSets'][number], ls: LineSetState): Promise<void> {
  await m.getRepository(LineSetRow).update({ id: stored.scheduleId, venueId }, { bricks: ls.load.bricks });

  const kept = new Set(ls.load.pieces.map((p) => p.id));
  for (const p of ls.startLoad.pieces) {
    const id = PIECE_KEY.exec(p.id)?.[1];
    if (id && !kept.has(p.id)) await m.getRepository(PieceRow).delete({ id: Number(id), lineSetId: stored.scheduleId });
  }
  const hung = new Set(ls.startLoad.pieces.map((p) => p.id));
  for (const p of stored.newPieces) {
    if (kept.has(p.key) && !hung.has(p.key)) {
      await m.getRepository(PieceRow).insert({ lineSetId: stored.scheduleId, name: p.name, massKg: p.massKg, positionM: p.positionM });
    }
  }

  // Bricks that left the arbor are on the bridge now, and the other way round.
  const types = new Set([...Object.keys(ls.startLoad.bricks), ...Object.keys(ls.load.bricks)]);
  for (const code of types) {
    const delta = (ls.startLoad.bricks[code] ?? 0) - (ls.load.bricks[code] ?? 0);
    if (delta === 0) continue;
    await m.getRepository(BrickTypeRow).createQueryBuilder().update()
      .set({ bridgeCount: () => `GREATEST(0, CAST(bridge_count AS SIGNED) + ${Math.trunc(delta)})` })
      .where('venue_id = :venueId AND code = :code', { venueId, code }).execute();
  }
}
