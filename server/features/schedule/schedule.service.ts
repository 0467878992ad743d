import type { DataSource, EntityManager } from 'typeorm';
import {
  computeLineSet,
  rigBrickTypes,
  withDefaultSettings,
  type BrickTypeView,
  type LineSetView,
  type PieceView,
  type ScheduleView,
  type VenueView,
} from '@shared/protocol/schedule';
import { Venue } from '../venue/venue.entity';
import { LoadingSessionRow } from '../sessions/session.entity';
import { BrickTypeRow } from './brick-type.entity';
import { LineSetRow } from './line-set.entity';
import { PieceRow } from './piece.entity';

export const toPieceView = (p: PieceRow): PieceView => ({
  id: p.id,
  name: p.name,
  massKg: p.massKg,
  positionM: p.positionM,
  spreadFromM: p.spreadFromM,
  spreadToM: p.spreadToM,
  department: p.department,
  notes: p.notes,
});

export const toBrickTypeView = (b: BrickTypeRow): BrickTypeView => ({
  id: b.id, code: b.code, name: b.name, massKg: b.massKg, heightM: b.heightM, widthM: b.widthM, depthM: b.depthM, bridgeCount: b.bridgeCount,
});

/** Reads the venue's schedule, with each line set's balance and capacity warnings computed. */
export class ScheduleService {
  constructor(private readonly db: DataSource) {}

  async venue(venueId: number, m: EntityManager = this.db.manager): Promise<VenueView> {
    const v = await m.getRepository(Venue).findOneByOrFail({ id: venueId });
    return { id: v.id, name: v.name, units: v.units, settings: withDefaultSettings(v.settings) };
  }

  async brickTypes(venueId: number, m: EntityManager = this.db.manager): Promise<BrickTypeView[]> {
    const rows = await m.getRepository(BrickTypeRow).find({ where: { venueId }, order: { massKg: 'DESC', id: 'ASC' } });
    return rows.map(toBrickTypeView);
  }

  async lineSets(venueId: number, m: EntityManager = this.db.manager, ids?: number[], context?: { venue: VenueView; brickTypes: BrickTypeView[] }): Promise<LineSetView[]> {
    const qb = m.getRepository(LineSetRow).createQueryBuilder('l').where('l.venue_id = :venueId', { venueId }).orderBy('l.number', 'ASC');
    if (ids) qb.andWhere('l.id IN (:...ids)', { ids: ids.length ? ids : [0] });
    const sets = await qb.getMany();
    const pieces = sets.length
      ? await m.getRepository(PieceRow).createQueryBuilder('p').where('p.line_set_id IN (:...ids)', { ids: sets.map((s) => s.id) }).orderBy('p.id').getMany()
      : [];
    const { venue, brickTypes } = context ?? { venue: await this.venue(venueId, m), brickTypes: await this.brickTypes(venueId, m) };
    const rigTypes = rigBrickTypes(brickTypes);
    const held = await openSessionsByLineSet(m, venueId);
    const bySet = new Map<number, PieceView[]>();
    for (const p of pieces) {
      const list = bySet.get(p.lineSetId) ?? [];
      list.push(toPieceView(p));
      bySet.set(p.lineSetId, list);
    }
    return sets.map((s) => {
      const view: Omit<LineSetView, 'computed'> = {
        id: s.id,
        number: s.number,
        name: s.name,
        distanceM: s.distanceM,
        purchase: s.purchase,
        pipeSize: s.pipeSize,
        pipeKgPerM: s.pipeKgPerM,
        pipeLengthM: s.pipeLengthM,
        pipeKg: s.pipeKg,
        liftLinesM: s.liftLinesM,
        liftLineRatingKg: s.liftLineRatingKg,
        battenRatingKgPerM: s.battenRatingKgPerM,
        arborKg: s.arborKg,
        arborCapacityKg: s.arborCapacityKg,
        highTrimM: s.highTrimM,
        lowTrimM: s.lowTrimM,
        notes: s.notes,
        bricks: s.bricks,
        outOfBalance: !!s.outOfBalance,
        outOfService: s.outOfService,
        openSession: held.get(s.id) ?? null,
        version: s.version,
        pieces: bySet.get(s.id) ?? [],
      };
      return { ...view, computed: computeLineSet(view, venue, rigTypes) };
    });
  }

  async schedule(venueId: number): Promise<ScheduleView> {
    const [venue, brickTypes] = await Promise.all([this.venue(venueId), this.brickTypes(venueId)]);
    const lineSets = await this.lineSets(venueId, this.db.manager, undefined, { venue, brickTypes });
    return { venue, lineSets, brickTypes };
  }
}

/** The venue's open loading sessions by the line sets they hold, read once (a CSV import checks every set). */
export async function openSessionsByLineSet(m: EntityManager, venueId: number): Promise<Map<number, { id: number; title: string }>> {
  const open = await m.getRepository(LoadingSessionRow).createQueryBuilder('s')
    .where("s.venue_id = :venueId AND s.phase <> 'finished'", { venueId }).orderBy('s.id').getMany();
  const held = new Map<number, { id: number; title: string }>();
  for (const s of open) for (const l of s.plan.lineSets) if (!held.has(l.scheduleId)) held.set(l.scheduleId, { id: s.id, title: s.title });
  return held;
}
