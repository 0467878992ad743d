import type { EntityManager } from 'typeorm';
import type { SessionState } from '@shared/protocol/session';
import type { LineSetLoad } from '@shared/rigging';
import { BrickTypeRow } from '../schedule/brick-type.entity';
import { LineSetRow } from '../schedule/line-set.entity';
import { PieceRow } from '../schedule/piece.entity';
import { recordChange, type ChangeAuthor } from '../schedule/history';
import type { StoredPlan } from './session.entity';

const PIECE_KEY = /^p(\d+)$/;

/**
 * What the schedule must learn from one decision: a line set's first test writes its new load;
 * every test sets its flag; a session ended early writes the load of every set that was worked but
 * not tested, and flags it, since nobody checked its balance.
 * Runs in the same transaction as the action.
 */
export async function writeBackSchedule(m: EntityManager, venueId: number, plan: StoredPlan, before: SessionState, after: SessionState, author: ChangeAuthor): Promise<void> {
  await writeBackTestedLineSets(m, venueId, plan, before, after, author);
  if (before.phase !== 'finished' && after.phase === 'finished' && after.endedHow === 'ended') {
    for (const ls of after.lineSets) {
      const stored = plan.lineSets.find((p) => p.key === ls.id);
      if (!stored || ls.stage === 'tested' || !ls.done.some(Boolean)) continue;
      // Never tested: the whole change; tested, then stopped during its correction: the correction's bricks so far.
      const correction = ls.corrections?.at(-1);
      if (ls.tests.length === 0) await writeLoad(m, venueId, stored, ls.startLoad, ls.load, author);
      else if (correction) await writeLoad(m, venueId, stored, correction.loadBefore, ls.load, author);
      await setFlag(m, venueId, stored.scheduleId, true, author);
    }
  }
}

/**
 * Once a line set's balance has been tested, the schedule shows what it carries now: its bricks,
 * its pieces, the bridge stock, and the out-of-balance flag (kept until a balanced test).
 * Runs in the same transaction as the action that recorded the test.
 */
async function writeBackTestedLineSets(m: EntityManager, venueId: number, plan: StoredPlan, before: SessionState, after: SessionState, author: ChangeAuthor): Promise<void> {
  for (const [i, ls] of after.lineSets.entries()) {
    const was = before.lineSets[i];
    if (ls.tests.length === was.tests.length) continue;
    const stored = plan.lineSets.find((p) => p.key === ls.id);
    if (!stored) continue;
    // The first test writes the whole change; a test after a correction writes the correction's bricks.
    const correction = ls.corrections?.at(-1);
    if (was.tests.length === 0) await writeLoad(m, venueId, stored, ls.startLoad, ls.load, author);
    else if (correction && was.stage !== 'tested') await writeLoad(m, venueId, stored, correction.loadBefore, ls.load, author);
    await setFlag(m, venueId, stored.scheduleId, ls.flagged, author);
  }
}

/** The out-of-balance flag, kept in the history when it changes; every write raises the set's version. */
async function setFlag(m: EntityManager, venueId: number, lineSetId: number, flagged: boolean, author: ChangeAuthor): Promise<void> {
  const row = await m.getRepository(LineSetRow).findOneBy({ id: lineSetId, venueId });
  if (!row || !!row.outOfBalance === flagged) return;
  await m.getRepository(LineSetRow).update({ id: lineSetId, venueId }, { outOfBalance: flagged, version: row.version + 1 });
  await recordChange(m, { venueId, subject: 'line-set', subjectId: lineSetId, lineSetId, action: 'update', changes: { outOfBalance: [!!row.outOfBalance, flagged] } }, author);
}

async function writeLoad(m: EntityManager, venueId: number, stored: StoredPlan['lineSets'][number], from: LineSetLoad, to: LineSetLoad, author: ChangeAuthor): Promise<void> {
  const ls = { startLoad: from, load: to };
  const lineSetId = stored.scheduleId;
  const row = await m.getRepository(LineSetRow).findOneBy({ id: lineSetId, venueId });
  if (!row) return;
  await m.getRepository(LineSetRow).update({ id: lineSetId, venueId }, { bricks: ls.load.bricks, version: row.version + 1 });
  await recordChange(m, { venueId, subject: 'line-set', subjectId: lineSetId, lineSetId, action: 'update', changes: sameBricks(row.bricks, ls.load.bricks) ? {} : { bricks: [row.bricks, ls.load.bricks] } }, author);

  const kept = new Set(ls.load.pieces.map((p) => p.id));
  for (const p of ls.startLoad.pieces) {
    const id = PIECE_KEY.exec(p.id)?.[1];
    if (!id || kept.has(p.id)) continue;
    const piece = await m.getRepository(PieceRow).findOneBy({ id: Number(id), lineSetId });
    if (!piece) continue;
    await m.getRepository(PieceRow).delete({ id: piece.id, lineSetId });
    await recordChange(m, { venueId, subject: 'piece', subjectId: piece.id, lineSetId, action: 'delete', changes: { name: [piece.name, null], massKg: [piece.massKg, null], positionM: [piece.positionM, null] } }, author);
  }
  const hung = new Set(ls.startLoad.pieces.map((p) => p.id));
  for (const p of stored.newPieces) {
    if (kept.has(p.key) && !hung.has(p.key)) {
      const saved = await m.getRepository(PieceRow).save(m.getRepository(PieceRow).create({ lineSetId, name: p.name, massKg: p.massKg, positionM: p.positionM }));
      await recordChange(m, { venueId, subject: 'piece', subjectId: saved.id, lineSetId, action: 'create', changes: { name: [null, p.name], massKg: [null, p.massKg], positionM: [null, p.positionM] } }, author);
    }
  }

  // Bricks that left the arbor are on the bridge now, and the other way round.
  const types = new Set([...Object.keys(ls.startLoad.bricks), ...Object.keys(ls.load.bricks)]);
  for (const code of types) {
    const delta = (ls.startLoad.bricks[code] ?? 0) - (ls.load.bricks[code] ?? 0);
    if (delta === 0) continue;
    const brick = await m.getRepository(BrickTypeRow).findOneBy({ venueId, code });
    if (brick) {
      const now = Math.max(0, brick.bridgeCount + Math.trunc(delta));
      await recordChange(m, { venueId, subject: 'bridge-stock', subjectId: brick.id, lineSetId, action: 'update', changes: { [code]: [brick.bridgeCount, now] } }, author);
    }
    await m.getRepository(BrickTypeRow).createQueryBuilder().update()
      .set({ bridgeCount: () => `GREATEST(0, CAST(bridge_count AS SIGNED) + ${Math.trunc(delta)})` })
      .where('venue_id = :venueId AND code = :code', { venueId, code }).execute();
  }
}

function sameBricks(a: Record<string, number>, b: Record<string, number>): boolean {
  const codes = new Set([...Object.keys(a), ...Object.keys(b)]);
  return [...codes].every((c) => (a[c] ?? 0) === (b[c] ?? 0));
}
