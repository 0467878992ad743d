import type { DataSource, EntityManager } from 'typeorm';
import {
  type BrickTypeFields,
  type BrickTypeView,
  type HistoryEntry,
  type LineSetFields,
  type LineSetHistory,
  type LineSetView,
  type PieceFields,
  type VenueInput,
  type VenueView,
  withDefaultSettings,
} from '@shared/protocol/schedule';
import { HttpError, forbidden, notFound } from '../../middleware/http-error';
import type { SignedInUser } from '../people/people.service';
import { Venue } from '../venue/venue.entity';
import { LoadingSessionRow } from '../sessions/session.entity';
import { BrickTypeRow } from './brick-type.entity';
import { LineSetRow } from './line-set.entity';
import { PieceRow } from './piece.entity';
import { ScheduleChangeRow } from './schedule-change.entity';
import { diffFields, recordChange, type ChangeAuthor } from './history';
import { openSessionsByLineSet, toBrickTypeView, type ScheduleService } from './schedule.service';

export const LINE_SET_FIELDS = [
  'number', 'name', 'distanceM', 'purchase', 'pipeSize', 'pipeKgPerM', 'pipeLengthM', 'liftLinesM', 'liftLineRatingKg',
  'battenRatingKgPerM', 'arborKg', 'arborCapacityKg', 'highTrimM', 'lowTrimM', 'notes', 'bricks',
] as const satisfies readonly (keyof LineSetFields)[];
export const PIECE_FIELDS = ['name', 'massKg', 'positionM', 'spreadFromM', 'spreadToM', 'department', 'notes'] as const satisfies readonly (keyof PieceFields)[];
const BRICK_FIELDS = ['code', 'name', 'massKg', 'heightM', 'widthM', 'depthM'] as const satisfies readonly (keyof BrickTypeFields)[];

const authorOf = (user: SignedInUser, reason?: string, via?: string): ChangeAuthor => ({ personId: user.id, personName: user.name, reason, via });
const utcTime = (ms: number) => `${new Date(ms).toISOString().slice(11, 16)} UTC`;

/** Only the technical director edits line sets, unless the venue's settings let rail operators do it too. */
export function mayEditLineSets(user: SignedInUser, venue: VenueView): boolean {
  return user.roles.includes('admin') || (user.roles.includes('rail') && venue.settings.railEditsLineSets);
}

/** Strips a line set row to its editable fields, as history and the CSV compare them. */
export function lineSetFieldsOf(row: LineSetRow): LineSetFields {
  return Object.fromEntries(LINE_SET_FIELDS.map((f) => [f, row[f]])) as LineSetFields;
}
export function pieceFieldsOf(row: PieceRow): PieceFields {
  return Object.fromEntries(PIECE_FIELDS.map((f) => [f, row[f]])) as PieceFields;
}

/**
 * Every change to the venue's data: line sets, pieces, brick types, bridge stock and settings.
 * Each runs in one transaction with the line set (or brick type) row locked, writes its history row
 * in the same transaction, and refuses a line set held by an open loading session.
 */
export class ScheduleEditor {
  constructor(private readonly db: DataSource, private readonly schedule: ScheduleService, private readonly now: () => number = Date.now) {}

  // ---------------------------------------------------------------- venue

  async updateVenue(user: SignedInUser, input: VenueInput): Promise<VenueView> {
    return this.db.transaction(async (m) => {
      const row = await m.getRepository(Venue).createQueryBuilder('v').setLock('pessimistic_write').where('v.id = :id', { id: user.venueId }).getOneOrFail();
      const before = { name: row.name, units: row.units, ...flatSettings(withDefaultSettings(row.settings)) };
      const after = { name: input.name, units: input.units, ...flatSettings(input.settings) };
      await m.getRepository(Venue).update({ id: row.id }, { name: input.name, units: input.units, settings: input.settings });
      await recordChange(m, {
        venueId: user.venueId, subject: 'venue', subjectId: row.id, lineSetId: null, action: 'update',
        changes: diffFields(before, after, Object.keys(after) as (keyof typeof after & string)[]),
      }, authorOf(user, input.reason), this.now());
      return this.schedule.venue(user.venueId, m);
    });
  }

  async venueHistory(user: SignedInUser): Promise<HistoryEntry[]> {
    const rows = await this.db.getRepository(ScheduleChangeRow).createQueryBuilder('c')
      .where("c.venue_id = :venueId AND c.subject IN ('venue', 'brick-type', 'bridge-stock')", { venueId: user.venueId })
      .orderBy('c.id', 'DESC').limit(500).getMany();
    return this.entries(user.venueId, rows);
  }

  // ---------------------------------------------------------------- line sets

  async createLineSet(user: SignedInUser, fields: LineSetFields, reason?: string): Promise<LineSetView> {
    return this.db.transaction(async (m) => {
      await this.mayEdit(m, user);
      await this.checkLineSetFields(m, user.venueId, fields, null);
      const row = await m.getRepository(LineSetRow).save(m.getRepository(LineSetRow).create({
        venueId: user.venueId, ...fields, pipeKg: fields.pipeKgPerM * fields.pipeLengthM, outOfBalance: false, outOfService: null, version: 1,
      }));
      await recordChange(m, {
        venueId: user.venueId, subject: 'line-set', subjectId: row.id, lineSetId: row.id, action: 'create',
        changes: diffFields(null, fields, LINE_SET_FIELDS),
      }, authorOf(user, reason), this.now());
      return this.view(m, user.venueId, row.id);
    });
  }

  async updateLineSet(user: SignedInUser, id: number, fields: LineSetFields, version: number, reason?: string): Promise<LineSetView> {
    return this.db.transaction(async (m) => {
      await this.mayEdit(m, user);
      const row = await this.lockLineSet(m, user.venueId, id, version);
      await this.checkLineSetFields(m, user.venueId, fields, row.id);
      await m.getRepository(LineSetRow).update({ id }, { ...fields, pipeKg: fields.pipeKgPerM * fields.pipeLengthM, version: row.version + 1 });
      await recordChange(m, {
        venueId: user.venueId, subject: 'line-set', subjectId: id, lineSetId: id, action: 'update',
        changes: diffFields(lineSetFieldsOf(row), fields, LINE_SET_FIELDS),
      }, authorOf(user, reason), this.now());
      return this.view(m, user.venueId, id);
    });
  }

  async deleteLineSet(user: SignedInUser, id: number, version: number, reason?: string): Promise<void> {
    await this.db.transaction(async (m) => {
      await this.mayEdit(m, user);
      const row = await this.lockLineSet(m, user.venueId, id, version);
      const pieces = await m.getRepository(PieceRow).find({ where: { lineSetId: id }, order: { id: 'ASC' } });
      for (const p of pieces) {
        await recordChange(m, {
          venueId: user.venueId, subject: 'piece', subjectId: p.id, lineSetId: id, action: 'delete', changes: diffFields(pieceFieldsOf(p), null, PIECE_FIELDS),
        }, authorOf(user, reason), this.now());
      }
      await m.getRepository(LineSetRow).delete({ id });
      await recordChange(m, {
        venueId: user.venueId, subject: 'line-set', subjectId: id, lineSetId: id, action: 'delete', changes: diffFields(lineSetFieldsOf(row), null, LINE_SET_FIELDS),
      }, authorOf(user, reason), this.now());
    });
  }

  /** Out of service with a reason, or back in. The planner and POST /api/sessions refuse a set that is out. */
  async setService(user: SignedInUser, id: number, input: { version: number; inService: boolean; reason?: string }): Promise<LineSetView> {
    return this.db.transaction(async (m) => {
      await this.mayEdit(m, user);
      const row = await this.lockLineSet(m, user.venueId, id, input.version);
      const outOfService = input.inService ? null : input.reason!;
      await m.getRepository(LineSetRow).update({ id }, { outOfService, version: row.version + 1 });
      await recordChange(m, {
        venueId: user.venueId, subject: 'line-set', subjectId: id, lineSetId: id, action: 'update',
        changes: { outOfService: [row.outOfService, outOfService] },
      }, authorOf(user, input.reason), this.now());
      return this.view(m, user.venueId, id);
    });
  }

  // ---------------------------------------------------------------- pieces (rail operators too)

  async addPiece(user: SignedInUser, lineSetId: number, piece: PieceFields, version: number, reason?: string): Promise<LineSetView> {
    return this.db.transaction(async (m) => {
      const ls = await this.lockLineSet(m, user.venueId, lineSetId, version);
      checkPieceOnBatten(piece, ls.pipeLengthM);
      const saved = await m.getRepository(PieceRow).save(m.getRepository(PieceRow).create({ lineSetId, ...piece }));
      await m.getRepository(LineSetRow).update({ id: lineSetId }, { version: ls.version + 1 });
      await recordChange(m, {
        venueId: user.venueId, subject: 'piece', subjectId: saved.id, lineSetId, action: 'create', changes: diffFields(null, piece, PIECE_FIELDS),
      }, authorOf(user, reason), this.now());
      return this.view(m, user.venueId, lineSetId);
    });
  }

  async updatePiece(user: SignedInUser, pieceId: number, piece: PieceFields, version: number, reason?: string): Promise<LineSetView> {
    return this.db.transaction(async (m) => {
      const { ls, row } = await this.lockPiece(m, user.venueId, pieceId, version);
      checkPieceOnBatten(piece, ls.pipeLengthM);
      await m.getRepository(PieceRow).update({ id: pieceId }, piece);
      await m.getRepository(LineSetRow).update({ id: ls.id }, { version: ls.version + 1 });
      await recordChange(m, {
        venueId: user.venueId, subject: 'piece', subjectId: pieceId, lineSetId: ls.id, action: 'update', changes: diffFields(pieceFieldsOf(row), piece, PIECE_FIELDS),
      }, authorOf(user, reason), this.now());
      return this.view(m, user.venueId, ls.id);
    });
  }

  async deletePiece(user: SignedInUser, pieceId: number, version: number, reason?: string): Promise<LineSetView> {
    return this.db.transaction(async (m) => {
      const { ls, row } = await this.lockPiece(m, user.venueId, pieceId, version);
      await m.getRepository(PieceRow).delete({ id: pieceId });
      await m.getRepository(LineSetRow).update({ id: ls.id }, { version: ls.version + 1 });
      await recordChange(m, {
        venueId: user.venueId, subject: 'piece', subjectId: pieceId, lineSetId: ls.id, action: 'delete', changes: diffFields(pieceFieldsOf(row), null, PIECE_FIELDS),
      }, authorOf(user, reason), this.now());
      return this.view(m, user.venueId, ls.id);
    });
  }

  // ---------------------------------------------------------------- bricks

  async createBrickType(user: SignedInUser, fields: BrickTypeFields, reason?: string): Promise<BrickTypeView> {
    return this.db.transaction(async (m) => {
      if (await m.getRepository(BrickTypeRow).findOneBy({ venueId: user.venueId, code: fields.code })) {
        throw new HttpError('bad-input', `A brick type with the code "${fields.code}" already exists.`, { code: ['That code is taken'] });
      }
      const row = await m.getRepository(BrickTypeRow).save(m.getRepository(BrickTypeRow).create({ venueId: user.venueId, ...fields, bridgeCount: 0 }));
      await recordChange(m, {
        venueId: user.venueId, subject: 'brick-type', subjectId: row.id, lineSetId: null, action: 'create', changes: diffFields(null, fields, BRICK_FIELDS),
      }, authorOf(user, reason), this.now());
      return toBrickTypeView(row);
    });
  }

  async updateBrickType(user: SignedInUser, id: number, fields: BrickTypeFields, reason?: string): Promise<BrickTypeView> {
    return this.db.transaction(async (m) => {
      const row = await this.lockBrickType(m, user.venueId, id);
      if (fields.code !== row.code) {
        const used = await this.arborsUsing(m, user.venueId, row.code);
        if (used.length) throw new HttpError('bad-input', `The code cannot change while bricks of this type are on line set ${used.join(', ')}.`, { code: ['In use on an arbor'] });
        if (await m.getRepository(BrickTypeRow).findOneBy({ venueId: user.venueId, code: fields.code })) {
          throw new HttpError('bad-input', `A brick type with the code "${fields.code}" already exists.`, { code: ['That code is taken'] });
        }
      }
      await m.getRepository(BrickTypeRow).update({ id }, fields);
      await recordChange(m, {
        venueId: user.venueId, subject: 'brick-type', subjectId: id, lineSetId: null, action: 'update', changes: diffFields(row as BrickTypeFields, fields, BRICK_FIELDS),
      }, authorOf(user, reason), this.now());
      return toBrickTypeView((await m.getRepository(BrickTypeRow).findOneByOrFail({ id })));
    });
  }

  async deleteBrickType(user: SignedInUser, id: number, reason?: string): Promise<void> {
    await this.db.transaction(async (m) => {
      const row = await this.lockBrickType(m, user.venueId, id);
      const used = await this.arborsUsing(m, user.venueId, row.code);
      if (used.length) throw new HttpError('conflict', `Bricks of this type are on the arbor of line set ${used.join(', ')}: take them off first.`);
      await m.getRepository(BrickTypeRow).delete({ id });
      await recordChange(m, {
        venueId: user.venueId, subject: 'brick-type', subjectId: id, lineSetId: null, action: 'delete',
        changes: { ...diffFields(row as BrickTypeFields, null, BRICK_FIELDS), bridgeCount: [row.bridgeCount, null] },
      }, authorOf(user, reason), this.now());
    });
  }

  /** A hand count of the bridge: the stock becomes what was counted, with the reason kept. */
  async setBridgeStock(user: SignedInUser, id: number, bridgeCount: number, reason: string): Promise<BrickTypeView> {
    return this.db.transaction(async (m) => {
      const row = await this.lockBrickType(m, user.venueId, id);
      await m.getRepository(BrickTypeRow).update({ id }, { bridgeCount });
      await recordChange(m, {
        venueId: user.venueId, subject: 'bridge-stock', subjectId: id, lineSetId: null, action: 'update',
        changes: row.bridgeCount === bridgeCount ? {} : { [row.code]: [row.bridgeCount, bridgeCount] },
      }, authorOf(user, reason), this.now());
      return toBrickTypeView({ ...row, bridgeCount });
    });
  }

  // ---------------------------------------------------------------- history

  async lineSetHistory(user: SignedInUser, lineSetId: number): Promise<LineSetHistory> {
    const rows = await this.db.getRepository(ScheduleChangeRow).createQueryBuilder('c')
      .where('c.venue_id = :venueId AND c.line_set_id = :lineSetId', { venueId: user.venueId, lineSetId })
      .orderBy('c.id', 'DESC').limit(1000).getMany();
    const exists = await this.db.getRepository(LineSetRow).existsBy({ id: lineSetId, venueId: user.venueId });
    if (!exists && rows.length === 0) throw notFound('That line set');
    const sessions = (await this.db.getRepository(LoadingSessionRow).createQueryBuilder('s')
      .where('s.venue_id = :venueId', { venueId: user.venueId }).orderBy('s.id', 'DESC').getMany())
      .filter((s) => s.plan.lineSets.some((l) => l.scheduleId === lineSetId))
      .map((s) => ({ id: s.id, title: s.title, phase: s.phase, createdAtMs: s.createdAtMs }));
    return { entries: await this.entries(user.venueId, rows), sessions };
  }

  private async entries(venueId: number, rows: ScheduleChangeRow[]): Promise<HistoryEntry[]> {
    const ids = [...new Set(rows.map((r) => r.sessionId).filter((id): id is number => id !== null))];
    const titles = new Map<number, string>();
    if (ids.length) {
      for (const s of await this.db.getRepository(LoadingSessionRow).createQueryBuilder('s')
        .where('s.venue_id = :venueId AND s.id IN (:...ids)', { venueId, ids }).getMany()) titles.set(s.id, s.title);
    }
    return rows.map((r) => ({
      id: Number(r.id),
      atMs: r.atMs,
      subject: r.subject,
      subjectId: r.subjectId,
      lineSetId: r.lineSetId,
      action: r.action,
      changes: r.changes,
      personName: r.personName,
      reason: r.reason,
      sessionId: r.sessionId,
      sessionTitle: r.sessionId ? titles.get(r.sessionId) ?? null : null,
      via: r.via,
    }));
  }

  // ---------------------------------------------------------------- guards

  private async mayEdit(m: EntityManager, user: SignedInUser): Promise<void> {
    if (!mayEditLineSets(user, await this.schedule.venue(user.venueId, m))) throw forbidden();
  }

  /**
   * Locks a line set for a change: not found at another venue, refused while an open loading session
   * holds it (naming the session), and refused when someone saved it after `version` (naming them).
   */
  async lockLineSet(m: EntityManager, venueId: number, id: number, version?: number): Promise<LineSetRow> {
    const row = await m.getRepository(LineSetRow).createQueryBuilder('l').setLock('pessimistic_write')
      .where('l.id = :id AND l.venue_id = :venueId', { id, venueId }).getOne();
    if (!row) throw notFound('That line set');
    const session = await openSessionHolding(m, venueId, id);
    if (session) {
      throw new HttpError('conflict', `Line set ${row.number} is in the open loading session "${session.title}" (session ${session.id}): it cannot be edited until that session is finished or ended.`);
    }
    if (version !== undefined && row.version !== version) {
      const last = await m.getRepository(ScheduleChangeRow).findOne({ where: { venueId, lineSetId: id }, order: { id: 'DESC' } });
      const who = last ? `${last.personName}${last.sessionId ? ` (loading session ${last.sessionId})` : ''} at ${utcTime(last.atMs)}` : 'someone else';
      throw new HttpError('conflict', `Line set ${row.number} was changed by ${who} after you opened it. Nothing was saved; what you typed is still in the form. Look at their change, then save again.`,
        { version: [`Now at version ${row.version}`] });
    }
    return row;
  }

  private async lockPiece(m: EntityManager, venueId: number, pieceId: number, version: number): Promise<{ ls: LineSetRow; row: PieceRow }> {
    const row = await m.getRepository(PieceRow).findOneBy({ id: pieceId });
    if (!row) throw notFound('That piece');
    const ls = await this.lockLineSet(m, venueId, row.lineSetId, version).catch((error) => {
      // A piece of another venue's line set is simply not found here.
      if (error instanceof HttpError && error.code === 'not-found') throw notFound('That piece');
      throw error;
    });
    return { ls, row };
  }

  private async lockBrickType(m: EntityManager, venueId: number, id: number): Promise<BrickTypeRow> {
    const row = await m.getRepository(BrickTypeRow).createQueryBuilder('b').setLock('pessimistic_write')
      .where('b.id = :id AND b.venue_id = :venueId', { id, venueId }).getOne();
    if (!row) throw notFound('That brick type');
    return row;
  }

  private async arborsUsing(m: EntityManager, venueId: number, code: string): Promise<number[]> {
    const sets = await m.getRepository(LineSetRow).find({ where: { venueId }, order: { number: 'ASC' } });
    return sets.filter((s) => (s.bricks[code] ?? 0) > 0).map((s) => s.number);
  }

  /** Field errors a schema cannot see: a number already taken, a brick type the venue does not have. */
  async checkLineSetFields(m: EntityManager, venueId: number, fields: LineSetFields, id: number | null): Promise<void> {
    const fieldErrors: Record<string, string[]> = {};
    const taken = await m.getRepository(LineSetRow).findOneBy({ venueId, number: fields.number });
    if (taken && taken.id !== id) fieldErrors.number = [`Line set ${fields.number} already exists`];
    const codes = new Set((await m.getRepository(BrickTypeRow).findBy({ venueId })).map((b) => b.code));
    for (const code of Object.keys(fields.bricks)) {
      if (!codes.has(code)) fieldErrors[`bricks.${code}`] = [`No brick type "${code}" at this venue`];
    }
    if (Object.keys(fieldErrors).length) {
      throw new HttpError('bad-input', `The line set is not valid. ${Object.values(fieldErrors).flat().join('. ')}.`, fieldErrors);
    }
  }

  private async view(m: EntityManager, venueId: number, id: number): Promise<LineSetView> {
    const [view] = await this.schedule.lineSets(venueId, m, [id]);
    return view;
  }
}

/** The open loading session whose plan holds this line set, if any. */
export async function openSessionHolding(m: EntityManager, venueId: number, lineSetId: number): Promise<{ id: number; title: string } | null> {
  return (await openSessionsByLineSet(m, venueId)).get(lineSetId) ?? null;
}

/** A piece must hang on its batten: positions within the pipe's length. */
export function checkPieceOnBatten(piece: PieceFields, pipeLengthM: number): void {
  const fieldErrors: Record<string, string[]> = {};
  for (const f of ['positionM', 'spreadFromM', 'spreadToM'] as const) {
    const v = piece[f];
    if (v !== null && v > pipeLengthM + 1e-9) fieldErrors[f] = ['Past the end of the batten'];
  }
  if (Object.keys(fieldErrors).length) throw new HttpError('bad-input', 'The piece must hang on the batten: a position is past its end.', fieldErrors);
}

function flatSettings(s: VenueView['settings']): Record<string, unknown> {
  const { minCrew, ...rest } = s;
  return { ...rest, 'minCrew.rail': minCrew.rail, 'minCrew.loader': minCrew.loader, 'minCrew.deck': minCrew.deck };
}
